// `npm run --silent audit:verify`: walks every audit hash chain (one per team, one for site events) in id order and
// checks each event's prev_hash against the previous event's hash and its hash against its contents
// (src/lib/crypto/audit-chain.ts). Exit 0 and one summary line when every chain holds; exit 2 and one line naming
// the first broken link (chain, event id, what differs) when one does not. Events written before the chain existed
// (id ≤ audit_chain_start.last_unchained_id) are counted, not checked. Needs DATABASE_URL (the app's role can read
// the audit; no write is made). Exit 1 when the database cannot be read or the arguments are wrong.
// `-- --team <team id>` (or `-- --team site`) checks that one chain only.
import { parseArgs } from 'node:util';
import { and, asc, eq, gt, isNull, type SQL } from 'drizzle-orm';
import { db, pool } from '../src/db/client';
import { auditChainStart, auditEvents } from '../src/db/schema';
import { firstBreak, type ChainBreak } from '../src/lib/crypto/audit-chain';

type Row = typeof auditEvents.$inferSelect;

function chainFilter(): SQL | undefined {
  const { values } = parseArgs({ options: { team: { type: 'string' } }, strict: true });
  if (values.team === undefined) return undefined;
  if (values.team === 'site') return isNull(auditEvents.teamId);
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(values.team)) {
    throw new UsageError(`--team "${values.team}" is neither a team id (UUID) nor "site"`);
  }
  return eq(auditEvents.teamId, values.team);
}

class UsageError extends Error {}

async function main(): Promise<number> {
  const only = chainFilter();
  const [start] = await db.select().from(auditChainStart).limit(1);
  const lastUnchained = start?.lastUnchainedId ?? 0;
  const chains = new Map<string, Row[]>();
  let checked = 0;
  // Read in pages so a long audit does not have to fit in one result.
  let after = lastUnchained;
  for (;;) {
    const page = await db.select().from(auditEvents).where(and(gt(auditEvents.id, after), only)).orderBy(asc(auditEvents.id)).limit(5000);
    if (page.length === 0) break;
    for (const row of page) {
      const key = row.teamId ?? 'site';
      const list = chains.get(key) ?? [];
      list.push(row);
      chains.set(key, list);
    }
    checked += page.length;
    after = page[page.length - 1].id;
  }
  let first: (ChainBreak & { chain: string }) | null = null;
  for (const [chain, rows] of chains) {
    const broken = firstBreak(rows);
    if (broken && (!first || broken.eventId < first.eventId)) first = { ...broken, chain };
  }
  if (first) {
    const chainName = first.chain === 'site' ? 'site events (no team)' : `team ${first.chain}`;
    process.stdout.write(`audit:verify: broken link in ${chainName} at event ${first.eventId}: ${first.problem}\n`);
    return 2;
  }
  process.stdout.write(`audit:verify: ${chains.size} chain${chains.size === 1 ? ' holds' : 's hold'}, ${checked} event${checked === 1 ? '' : 's'} checked, ${lastUnchained} written before the chain started (not checked)\n`);
  return 0;
}

try {
  process.exitCode = await main();
} catch (error) {
  const usage = error instanceof UsageError || (error as { code?: string }).code?.startsWith('ERR_PARSE_ARGS');
  process.stderr.write(usage ? `audit:verify: ${(error as Error).message}; usage: npm run --silent audit:verify [-- --team <team id> | --team site]\n` : `audit:verify: cannot read the audit: ${(error as Error).message.split('\n')[0]}\n`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
