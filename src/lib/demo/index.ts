export {
  DEMO_CONDITIONS,
  DEMO_GENERATOR_VERSION,
  DEMO_LAB,
  DEMO_PATIENT_FIELD,
  DEMO_TASK,
  describeCohort,
  synthesizeSubject,
  writeSubjectEdf,
  type CohortOptions,
  type CohortParameters,
  type DemoArtifact,
  type DemoEvent,
  type SubjectParameters,
} from './cohort';
export { synthesizeAperiodic } from './aperiodic-noise';
export { DEMO_CHANNELS, topographyGains } from './montage';
export { createRandom, mix32, type Random } from './random';
