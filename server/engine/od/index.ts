/** Orbit determination from optical astrometry (issue 8; METHODS.md §9): public API of server/engine/od. */
// Observations and geometry
export { parseAdesPsv, observationKey, normalizeObsTime, ADES_VERSIONS } from './ades';
export type { AdesParseResult } from './ades';
export * from './observatory';
export * from './earthOrientation';
export { observerStatesAu, siteGeocentricAu, UnknownObservatoryError } from './observer';
export type { ObserverOptions, ObserverState } from './observer';
export { predictAstrometry } from './predict';
export type { PredictObservation, PredictOptions, PredictedAstrometry } from './predict';
export { synthesizeAdesPsv } from './synthetic';
export type { SyntheticArcOptions, SyntheticArc } from './synthetic';
// Fitting
export { gaussMethod, gaussPolynomialRoots, GaussError, DEGENERATE_D0 } from './gauss';
export type { GaussObservation, GaussOptions, GaussSolution, GaussResult } from './gauss';
export {
  differentialCorrection,
  normalEquations,
  solveNormal,
  correctionMeasure,
  observationWeight,
  ARCSEC_RAD,
  CONVERGENCE_MEASURE,
} from './leastSquares';
export type { LeastSquaresProblem, LeastSquaresResult, ModelEvaluation, IterationRecord } from './leastSquares';
export { observationChiSquares, outlierPass, rejectThreshold, CHI2_REJECT, CHI2_RECOVER } from './outliers';
export {
  chiSquareSurvival,
  logChiSquareSurvival,
  chiSquareCdf,
  sigmaFromPValue,
  sigmaFromLogPValue,
  gammaP,
  gammaQ,
  kolmogorovSmirnov,
} from './statistics';
export { compareFits, residualTrend } from './compare';
export { encounterUncertainty, ENCOUNTER_SEARCH_YEARS } from './encounter';
export {
  determineOrbit,
  defaultFitEpoch,
  OrbitDeterminationError,
  FitAbortedError,
  NIGHT_GAP_DAYS,
  MIN_ARC_DAYS,
} from './fit';
export type { DetermineOrbitInput, DetermineOrbitHooks, OdErrorCode } from './fit';
export { fitToSolutionInput, jdText } from './solutionInput';
export type { FitSolutionMeta } from './solutionInput';
