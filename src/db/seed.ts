// The demo: an invented lab, the Saltmarsh Rhythms Lab, and its "Harbour Lights" task (the demo cohort of
// src/lib/demo/cohort.ts: lamp-watch versus oar-pull cues). People,
// addresses and passwords are invented for the demo (".example" addresses are reserved by RFC 2606).
import { and, eq, sql } from 'drizzle-orm';
import type { Db } from './client';
import { memberships, studies, teams, users } from './schema';
import type { Role } from '../lib/permissions';
import { hashPassword } from '../lib/crypto/password';
import { newUserId } from '../lib/crypto/ids';

export const DEMO_TEAM = { name: 'Saltmarsh Rhythms Lab', slug: 'saltmarsh' };

/** `operator` is the site-administration flag (no team role: the operator is not a member of the demo team). */
export const DEMO_PEOPLE: { email: string; displayName: string; role: Role | 'operator'; password: string }[] = [
  { email: 'operator@saltmarsh.example', displayName: 'Rowan Quay', role: 'operator', password: 'demo-operator-pass' },
  { email: 'lead@saltmarsh.example', displayName: 'Maren Holt', role: 'lead', password: 'demo-lead-pass' },
  { email: 'analyst1@saltmarsh.example', displayName: 'Idris Fenn', role: 'analyst', password: 'demo-analyst-pass' },
  { email: 'analyst2@saltmarsh.example', displayName: 'Sol Varga', role: 'analyst', password: 'demo-analyst-pass' },
  { email: 'reviewer@saltmarsh.example', displayName: 'Tove Lind', role: 'reviewer', password: 'demo-reviewer-pass' },
];

export const DEMO_STUDIES = [
  {
    name: 'Harbour-bell anticipation',
    description:
      'Scalp EEG during the Harbour Lights task: lamp-watch cues (remember a lighthouse blink pattern) against oar-pull cues (squeeze a handle). Demo cohort TM-S01 to TM-S12.',
  },
  {
    name: 'Ebb and flow rest blocks',
    description: 'Eyes-open and eyes-closed rest blocks, used to check aperiodic slope estimates across caps.',
  },
];

/**
 * The demo files (`demo-data/`, served at /demo/<file>) that belong to each demo study: the Harbour Lights cohort is
 * a task recording, so only the task study offers it; the rest study has no demo recordings of its own and offers
 * none. A study outside the demo team (one a person creates in the demo build) may try the cohort.
 */
export const DEMO_STUDY_DATA: Record<string, 'harbour-lights' | null> = {
  'Harbour-bell anticipation': 'harbour-lights',
  'Ebb and flow rest blocks': null,
};

/** Whether the workspace of this study offers the generated demo cohort. */
export function offersDemoCohort(teamSlug: string, studyName: string): boolean {
  if (teamSlug !== DEMO_TEAM.slug || !(studyName in DEMO_STUDY_DATA)) return true;
  return DEMO_STUDY_DATA[studyName] === 'harbour-lights';
}

/** Creates the demo team, people and studies when missing; never changes what already exists. */
export async function seedDemo(db: Db): Promise<{ created: number }> {
  let created = 0;
  return db.transaction(async (tx) => {
    let [team] = await tx.select().from(teams).where(eq(teams.slug, DEMO_TEAM.slug)).limit(1);
    if (!team) {
      [team] = await tx.insert(teams).values(DEMO_TEAM).returning();
      created++;
    }
    let leadId: string | null = null;
    for (const person of DEMO_PEOPLE) {
      let [user] = await tx.select().from(users).where(sql`lower(${users.email}) = ${person.email}`).limit(1);
      if (!user) {
        [user] = await tx
          .insert(users)
          .values({ id: newUserId(), email: person.email, displayName: person.displayName, passwordHash: await hashPassword(person.password), isOperator: person.role === 'operator' })
          .returning();
        created++;
      }
      if (person.role === 'lead') leadId = user.id;
      if (person.role === 'operator') continue;
      const inserted = await tx.insert(memberships).values({ userId: user.id, teamId: team.id, role: person.role }).onConflictDoNothing().returning();
      created += inserted.length;
    }
    for (const study of DEMO_STUDIES) {
      const [existing] = await tx.select().from(studies).where(and(eq(studies.teamId, team.id), eq(studies.name, study.name))).limit(1);
      if (!existing) {
        await tx.insert(studies).values({ ...study, teamId: team.id, createdBy: leadId });
        created++;
      }
    }
    return { created };
  });
}
