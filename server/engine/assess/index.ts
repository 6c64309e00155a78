/** Engine II: risk assessment (linear, line of variations, Monte Carlo via montecarlo.ts), consequences, ratings. */
export { assess, AssessError } from './assess';
export type { AssessResult } from './assess';
export { linearAssessment } from './linear';
export type { LinearApproachResult, SolutionPoint, WorkingCovariance } from './linear';
export { lovAssessment, semilinearIp, lovSegmentIp, lovDirection } from './lov';
export type { LovResult, LovWindow, LovVirtualImpactor } from './lov';
export type * from './types';
