/** Two-body relations: Kepler solvers, elements <-> state, universal-variable propagation. */
export * from './kepler';
export * from './universal';
export * from './elements';
