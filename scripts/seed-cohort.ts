// The demo study's cohort (issue 12, item 7): the 12 demo subjects' summaries, computed by the real core from the
// demo files (src/cli/demo-summaries.ts), saved as analysis sessions of the first demo analyst and signed off by the
// demo lead through the product's own path (recipe version, summary, submit, sign-off with the signed-content hash
// and the audit chain). Idempotent: a subject that already has a session in the study is left alone.
import { and, eq, sql } from 'drizzle-orm';
import { db } from '../src/db/client';
import { analysisSessions, memberships, studies, teams, users } from '../src/db/schema';
import { createAnalysisSession } from '../src/db/queries/analysis-sessions';
import { applyStatusChange, saveRecipeVersion, uploadSummary } from '../src/db/queries/review';
import { DEMO_PEOPLE, DEMO_STUDIES, DEMO_TEAM } from '../src/db/seed';
import type { DemoSubjectSummary } from '../src/cli/demo-summaries';

export async function seedDemoCohort(subjects: DemoSubjectSummary[]): Promise<{ created: number }> {
  const [team] = await db.select().from(teams).where(eq(teams.slug, DEMO_TEAM.slug)).limit(1);
  if (!team) return { created: 0 };
  const [study] = await db.select().from(studies).where(and(eq(studies.teamId, team.id), eq(studies.name, DEMO_STUDIES[0].name))).limit(1);
  const person = async (email: string) => (await db.select({ id: users.id, displayName: users.displayName }).from(users).innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.teamId, team.id))).where(sql`lower(${users.email}) = ${email}`).limit(1))[0];
  const analyst = await person(DEMO_PEOPLE.find((p) => p.role === 'analyst')!.email);
  const lead = await person(DEMO_PEOPLE.find((p) => p.role === 'lead')!.email);
  if (!study || !analyst || !lead) return { created: 0 };
  const existing = new Set((await db.select({ code: analysisSessions.subjectCode }).from(analysisSessions).where(eq(analysisSessions.studyId, study.id))).map((r) => r.code));
  let created = 0;
  for (const s of subjects) {
    if (existing.has(s.code)) continue;
    const made = await createAnalysisSession(study.id, team.id, analyst.id, { subjectCode: s.code, fingerprint: s.fingerprint });
    if (!made.ok) continue; // a session for this subject and recording already exists
    const session = made.session;
    const ctx = { session, study, team, role: 'analyst' as const };
    const saved = await saveRecipeVersion(ctx, analyst.id, null, s.recipe);
    if (!saved.ok) throw new Error(`demo cohort: ${s.code}: the recipe version was not saved (${saved.reason})`);
    const bytes = Buffer.byteLength(JSON.stringify(s.summary));
    const uploaded = await uploadSummary(ctx, saved.version, analyst.id, s.summary, bytes);
    if (!uploaded.ok) throw new Error(`demo cohort: ${s.code}: the summary was not stored (${uploaded.reason})`);
    for (const [who, change] of [[analyst, 'submit'], [lead, 'signOff']] as const) {
      const r = await applyStatusChange({ ...ctx, role: who === lead ? 'lead' : 'analyst' }, who, change, 1, null);
      if (!r.ok) throw new Error(`demo cohort: ${s.code}: ${change} refused (${r.code})`);
    }
    created++;
  }
  return { created };
}
