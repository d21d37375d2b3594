export * from './auth';
export * from './teams';
export * from './analysis';
export * from './system';
export * from './review';
export * from './cohort';
export * from './slope';
