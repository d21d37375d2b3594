export * from './distribution';
export * from './group-map';
export * from './pooling';
export * from './values';
export * from './model';
export * from './covariates-csv';
