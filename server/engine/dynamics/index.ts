/** Dynamics: force models, IAS15 integrator, propagate(), close approaches and b-plane. */
export type { NonGravParams, DynamicsModel, StepInfo, PlanetEphemeris, ForceModel, DynamicsBody } from './types';
export { propagate, makeForceModel, ImpactMonitor } from './propagate';
export type { PropagateOptions, PropagateResult, ImpactEvent } from './propagate';
export { Ias15, StepCollapseError, RADAU_NODES } from './ias15';
export type { Ias15Options } from './ias15';
export { NBodyForce, TwoBodyForce, PERTURBER_GM_AU3_D2 } from './forces';
export { gWaterIce, gInverseSquare, gOfR, addNonGravInto } from './nongrav';
export { brentRoot } from './brent';
export { defaultEphemeris } from './ephemeris-source';
export { findCloseApproaches, ApproachMonitor } from './approaches';
export type { CloseApproach, FindCloseApproachesOptions } from './approaches';
export { bPlaneFromState, captureRadiusKm } from './bplane';
export type { BPlane } from './bplane';
