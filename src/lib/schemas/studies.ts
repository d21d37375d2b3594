import { z } from '../analysis/zod';

export const StudyInput = z.object({
  name: z.string().trim().min(1, 'Give the study a name.').max(120, 'Use at most 120 characters.'),
  description: z.string().trim().max(2000, 'Use at most 2000 characters.').default(''),
});

/** A subject code is the team's own pseudonym, never a name: letters, digits, dot, dash, underscore. */
export const AnalysisSessionInput = z.object({
  subjectCode: z
    .string()
    .trim()
    .min(1, 'Enter the subject code.')
    .max(40)
    .regex(/^[A-Za-z0-9._-]+$/, 'Use letters, digits, dot, dash or underscore (a code, never a name).'),
  fingerprint: z
    .string()
    .regex(/^[0-9a-f]{64}$/, 'A fingerprint is the SHA-256 of the recording: 64 lowercase hex digits.')
    .nullable()
    .default(null),
});
