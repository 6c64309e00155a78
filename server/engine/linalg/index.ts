export * from './matrix';
export * from './cholesky';
export * from './eigen';
export * from './covariance';
