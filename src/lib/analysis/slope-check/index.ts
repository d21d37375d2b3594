// The slope check: how far an aperiodic (1/f) estimate can be trusted, and what a change of it does to normalized
// maps. Pure functions over the product's own Welch and fit; the workspace runs them in a worker.
export * from './simulate';
export * from './bench';
export * from './sensitivity';
export * from './shift';
export * from './sweep';
