// The outbox sender (issue 17): delivers the mail that routes queue in `mail_outbox` (src/lib/server/mail.ts) through
// the relay (TIDEMARK_SMTP_URL) or the local mail fake (SMTP_HOST/SMTP_PORT). server/main.mjs starts one per app
// process and stops it on SIGTERM.
//
// - Claims due messages with FOR UPDATE SKIP LOCKED and a lease (`claimed_until`), so several app processes on one
//   database never send the same message twice at once, and a process that died mid-send releases its claim by time.
// - A message the relay accepts is marked sent and its bodies are cleared (they may carry an invitation or reset
//   link). A transient failure (relay unreachable, 4xx) counts an attempt and waits 1, 2, 4, … seconds, at most 15
//   minutes, then tries again, for as long as it takes; an SMTP 5xx answer (the relay refuses the message for good)
//   marks it failed. After a connection failure the round stops: the other messages are not tried against a relay
//   that is down.
// - Delivery is at least once: a crash after the relay accepted a message and before it was marked sent (a window of
//   one UPDATE) sends it again when the lease runs out. Every attempt carries the same Message-ID.
import nodemailer from 'nodemailer';
import pg from 'pg';

/** Seconds to wait after the `attempts`-th failed attempt: 1, 2, 4, 8, … capped at 900 (15 minutes). */
export function retryDelaySeconds(attempts) {
  return Math.min(900, 2 ** Math.max(0, attempts - 1));
}

/** true for an SMTP answer that says the message will never be accepted (RFC 5321 §4.2.1: 5yz is permanent). */
export function isPermanentRefusal(error) {
  return typeof error?.responseCode === 'number' && error.responseCode >= 500 && error.responseCode < 600;
}

const CONNECTION_CODES = new Set(['ECONNECTION', 'ETIMEDOUT', 'ESOCKET', 'EDNS', 'ECONNREFUSED', 'ECONNRESET', 'EHOSTUNREACH', 'ENOTFOUND', 'ETLS']);

function oneLine(error) {
  return String(error?.message ?? error).split('\n')[0].slice(0, 500);
}

/**
 * Starts the sender. Returns { wake(), stop() }: `wake` looks for due mail at once (after a route queued some);
 * `stop` takes no new message, lets the one being sent finish, releases the claims it still holds, and closes.
 */
export function startMailSender({
  databaseUrl = process.env.DATABASE_URL,
  smtpUrl = process.env.TIDEMARK_SMTP_URL,
  smtpHost = process.env.SMTP_HOST ?? '127.0.0.1',
  smtpPort = Number(process.env.SMTP_PORT ?? 2525),
  from = process.env.MAIL_FROM ?? 'Tidemark <no-reply@tidemark.invalid>',
  pollMs = 1000,
  batch = 10,
  leaseSeconds = 60,
  log = (line) => process.stderr.write(`tidemark: mail outbox: ${line}\n`),
} = {}) {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2, connectionTimeoutMillis: 5_000, idleTimeoutMillis: 30_000, statement_timeout: 15_000 });
  pool.on('error', () => {}); // an idle connection dropped by a restart is replaced; never fatal
  const timeouts = { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 };
  const transport = smtpUrl
    ? nodemailer.createTransport(smtpUrl, timeouts)
    : nodemailer.createTransport({ host: smtpHost, port: smtpPort, secure: false, ignoreTLS: true, ...timeouts });

  let stopping = false;
  let timer = null;
  let current = null;
  let wakeAgain = false;
  let databaseDown = false;

  async function release(ids) {
    if (ids.length) await pool.query('UPDATE mail_outbox SET claimed_until = NULL WHERE id = ANY($1::bigint[])', [ids]);
  }

  /** One round: claims up to `batch` due messages and sends them in order. Resolves true when more may be due. */
  async function round() {
    const { rows } = await pool.query(
      `UPDATE mail_outbox SET claimed_until = now() + make_interval(secs => $1)
        WHERE id IN (SELECT id FROM mail_outbox
                      WHERE sent_at IS NULL AND failed_at IS NULL AND next_attempt_at <= now()
                        AND (claimed_until IS NULL OR claimed_until < now())
                      ORDER BY id LIMIT $2 FOR UPDATE SKIP LOCKED)
        RETURNING id, to_address, subject, text_body, html_body, message_id, attempts`,
      [leaseSeconds, batch],
    );
    rows.sort((a, b) => Number(a.id) - Number(b.id));
    for (let i = 0; i < rows.length; i++) {
      const row = rows[i];
      if (stopping) {
        await release(rows.slice(i).map((r) => r.id));
        return false;
      }
      try {
        await transport.sendMail({
          from,
          to: row.to_address,
          subject: row.subject,
          text: row.text_body ?? '',
          ...(row.html_body ? { html: row.html_body } : {}),
          messageId: row.message_id,
          textEncoding: 'base64', // keeps long links intact for anyone reading the raw message
        });
        await pool.query(
          'UPDATE mail_outbox SET sent_at = now(), attempts = attempts + 1, claimed_until = NULL, last_error = NULL, text_body = NULL, html_body = NULL WHERE id = $1',
          [row.id],
        );
      } catch (error) {
        const attempts = row.attempts + 1;
        if (isPermanentRefusal(error)) {
          await pool.query('UPDATE mail_outbox SET failed_at = now(), attempts = $2, claimed_until = NULL, last_error = $3 WHERE id = $1', [row.id, attempts, oneLine(error)]);
          log(`message ${row.id} refused for good by the relay (${error.responseCode}): ${oneLine(error)}`);
          continue;
        }
        const wait = retryDelaySeconds(attempts);
        await pool.query(
          'UPDATE mail_outbox SET attempts = $2, next_attempt_at = now() + make_interval(secs => $3), claimed_until = NULL, last_error = $4 WHERE id = $1',
          [row.id, attempts, wait, oneLine(error)],
        );
        log(`message ${row.id} not sent (attempt ${attempts}: ${error?.code ?? ''} ${oneLine(error)}); next try in ${wait} s`);
        if (CONNECTION_CODES.has(error?.code)) {
          // The relay is unreachable: leave the rest of this round for later rather than fail them one by one.
          await release(rows.slice(i + 1).map((r) => r.id));
          return false;
        }
      }
    }
    return rows.length === batch;
  }

  function schedule(ms) {
    if (stopping) return;
    clearTimeout(timer);
    timer = setTimeout(tick, ms);
    timer.unref?.();
  }

  function tick() {
    timer = null;
    current = round()
      .then((more) => {
        if (databaseDown) log('database reachable again');
        databaseDown = false;
        return more;
      })
      .catch((error) => {
        if (!databaseDown) log(`cannot read the outbox (${error?.code ?? oneLine(error)}); trying again`);
        databaseDown = true;
        return false;
      })
      .then((more) => {
        current = null;
        const again = more || wakeAgain;
        wakeAgain = false;
        schedule(again ? 0 : pollMs);
      });
  }

  schedule(0);

  return {
    wake() {
      if (stopping) return;
      if (current) wakeAgain = true;
      else schedule(0);
    },
    /** Stops taking messages; resolves with how many wait in the outbox for the next start (null if unknown). */
    async stop() {
      stopping = true;
      clearTimeout(timer);
      await current;
      let waiting = null;
      try {
        const { rows } = await pool.query('SELECT count(*)::int AS n FROM mail_outbox WHERE sent_at IS NULL AND failed_at IS NULL');
        waiting = rows[0].n;
      } catch {
        // the database is down: whatever is queued stays queued
      }
      transport.close();
      await pool.end().catch(() => {});
      return waiting;
    },
  };
}
