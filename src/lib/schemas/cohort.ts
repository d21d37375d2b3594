/**
 * The Cohort screen's request bodies (issue 12): subject covariates and the study's group-test design. Covariates
 * are numbers per subject code (a group is coded as a number, e.g. 0 and 1); nothing here can carry a name.
 */
import { z } from '../analysis/zod';
import { DesignSchema } from '../statistics/design';
import { ConditionName, Label, SubjectCode } from './review';

export const COVARIATE_CAPS = { names: 16, rows: 2_000, bodyBytes: 131_072 } as const;
export const DESIGN_CAPS = { tests: 32, bodyBytes: 16_384 } as const;

/** Names the tidy export already uses for its own columns. */
export const RESERVED_COLUMNS = ['subject', 'condition', 'band', 'window', 'channel', 'value', 'recipe_hash', 'sign_off'] as const;

export const CovariateName = z
  .string()
  .min(1, 'must not be empty')
  .max(32, 'must be at most 32 characters')
  .regex(/^[A-Za-z][A-Za-z0-9_]*$/, 'must start with a letter and hold only letters, digits and _ (it becomes a CSV column)')
  .refine((n) => !(RESERVED_COLUMNS as readonly string[]).includes(n.toLowerCase()), 'is a column the export already has');

const finite = z.number().refine(Number.isFinite, 'must be a finite number');

/**
 * The study's whole covariate table: `names`, then one row per subject with one value (or null: not known) per
 * name. Saving replaces the study's covariates.
 */
export const CovariatesInput = z
  .object({
    names: z.array(CovariateName).max(COVARIATE_CAPS.names, `holds at most ${COVARIATE_CAPS.names} covariates`),
    rows: z
      .array(z.object({ subject: SubjectCode, values: z.array(finite.nullable()).max(COVARIATE_CAPS.names) }).strict())
      .max(COVARIATE_CAPS.rows, `holds at most ${COVARIATE_CAPS.rows} subjects`),
  })
  .strict()
  .superRefine((c, ctx) => {
    const names = new Set<string>();
    c.names.forEach((n, i) => {
      if (names.has(n.toLowerCase())) ctx.addIssue({ code: 'custom', path: ['names', i], message: `"${n}" is listed twice` });
      names.add(n.toLowerCase());
    });
    const subjects = new Set<string>();
    c.rows.forEach((r, i) => {
      if (subjects.has(r.subject)) ctx.addIssue({ code: 'custom', path: ['rows', i, 'subject'], message: `"${r.subject}" is listed twice` });
      subjects.add(r.subject);
      if (r.values.length !== c.names.length) ctx.addIssue({ code: 'custom', path: ['rows', i, 'values'], message: `has ${r.values.length} values; names has ${c.names.length}` });
    });
  });
export type CovariatesInputT = z.infer<typeof CovariatesInput>;

/** The map test the study runs: over one channel group, one condition against the neutral value, or two paired. */
export const MapTestDesign = z
  .object({
    channelGroup: Label,
    conditions: z.union([z.tuple([ConditionName]), z.tuple([ConditionName, ConditionName])], { error: 'must name one condition, or two to compare' }),
    alpha: z.number().gt(0, 'must lie between 0 and 1').lt(1, 'must lie between 0 and 1').default(0.05),
  })
  .strict()
  .refine((m) => m.conditions.length === 1 || m.conditions[0] !== m.conditions[1], { message: 'must name two different conditions', path: ['conditions'] });

/** The design saved with a study: the statistics contract's design.json and the map test. */
export const CohortDesign = z
  .object({
    design: DesignSchema.refine((d) => d.tests.length <= DESIGN_CAPS.tests, `holds at most ${DESIGN_CAPS.tests} tests`),
    mapTest: MapTestDesign.nullable().default(null),
  })
  .strict();
export type CohortDesignT = z.output<typeof CohortDesign>;

/** Saving the design: `revision` is the one the edit started from (null when the study has none yet). */
export const CohortDesignInput = z
  .object({ revision: z.number().int('must be a whole number').min(1, 'must be at least 1').nullable(), cohort: CohortDesign })
  .strict();
