export * from './distributions';
export * from './errors';
export * from './fdr';
export * from './map-test';
export * from './normality';
export * from './regression';
export * from './rm-anova';
export * from './t-tests';
