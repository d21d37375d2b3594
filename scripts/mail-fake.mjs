// The local mail fake: an SMTP server on loopback that accepts every message and stores it in mail_messages,
// where the dev mailbox page (/dev/mailbox) and the tests read it. Nothing is relayed anywhere.
import { SMTPServer } from 'smtp-server';
import pg from 'pg';

const port = Number(process.env.SMTP_PORT ?? 2525);
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });

function decodeBody(headers, body) {
  const encoding = (headers['content-transfer-encoding'] ?? '7bit').toLowerCase();
  if (encoding === 'base64') return Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8');
  if (encoding === 'quoted-printable') {
    const bytes = Buffer.from(
      body.replace(/=\r?\n/g, '').replace(/=([0-9A-F]{2})/gi, (_, h) => String.fromCharCode(parseInt(h, 16))),
      'latin1',
    );
    return bytes.toString('utf8');
  }
  return body;
}

function parseHeaders(block) {
  const headers = {};
  for (const line of block.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const i = line.indexOf(':');
    if (i > 0) headers[line.slice(0, i).trim().toLowerCase()] = line.slice(i + 1).trim();
  }
  return headers;
}

function decodeWords(value) {
  return value.replace(/=\?utf-8\?([bq])\?([^?]*)\?=/gi, (_, kind, text) =>
    kind.toLowerCase() === 'b'
      ? Buffer.from(text, 'base64').toString('utf8')
      : Buffer.from(text.replace(/_/g, ' ').replace(/=([0-9A-F]{2})/gi, (__, h) => String.fromCharCode(parseInt(h, 16))), 'latin1').toString('utf8'),
  );
}

/** Plain text of a message: the text/plain part of a multipart message, or the single body. */
export function parseMessage(raw) {
  const split = raw.search(/\r?\n\r?\n/);
  const headers = parseHeaders(raw.slice(0, split));
  let body = raw.slice(split).replace(/^\r?\n\r?\n/, '');
  let text = '';
  const boundary = /boundary="?([^";]+)"?/i.exec(headers['content-type'] ?? '')?.[1];
  if (boundary) {
    for (const part of body.split(`--${boundary}`)) {
      const at = part.search(/\r?\n\r?\n/);
      if (at < 0) continue;
      const partHeaders = parseHeaders(part.slice(0, at).replace(/^\r?\n/, ''));
      if ((partHeaders['content-type'] ?? '').toLowerCase().startsWith('text/plain')) {
        text = decodeBody(partHeaders, part.slice(at).replace(/^\r?\n\r?\n/, ''));
        break;
      }
    }
  } else {
    text = decodeBody(headers, body);
  }
  return { subject: decodeWords(headers.subject ?? '(no subject)'), text: text.trim() };
}

const server = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS'],
  banner: 'Tidemark mail fake',
  size: 1024 * 1024,
  onData(stream, session, callback) {
    const chunks = [];
    stream.on('data', (c) => chunks.push(c));
    stream.on('end', async () => {
      try {
        const raw = Buffer.concat(chunks).toString('utf8');
        const { subject, text } = parseMessage(raw);
        await pool.query(
          'INSERT INTO mail_messages (from_address, to_addresses, subject, text_body, raw) VALUES ($1, $2, $3, $4, $5)',
          [session.envelope.mailFrom?.address ?? '', session.envelope.rcptTo.map((r) => r.address).join(', '), subject, text, raw],
        );
        callback();
      } catch (error) {
        callback(error);
      }
    });
  },
});

server.on('error', (error) => process.stderr.write(`mail fake: ${error.message}\n`));
server.listen(port, '127.0.0.1', () => process.stdout.write(`mail fake listening on 127.0.0.1:${port}\n`));
const stop = () => server.close(() => pool.end().then(() => process.exit(0)));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
