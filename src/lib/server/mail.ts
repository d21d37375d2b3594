import nodemailer from 'nodemailer';

const host = process.env.SMTP_HOST ?? '127.0.0.1';
const port = Number(process.env.SMTP_PORT ?? 2525);
const from = process.env.MAIL_FROM ?? 'Tidemark <no-reply@tidemark.invalid>';

// A deployment names its relay in TIDEMARK_SMTP_URL (smtp:// or smtps://, checked by `npm run serve`); the local demo
// talks to the mail fake on loopback.
const transport = process.env.TIDEMARK_SMTP_URL
  ? nodemailer.createTransport(process.env.TIDEMARK_SMTP_URL)
  : nodemailer.createTransport({ host, port, secure: false, ignoreTLS: true });

/** true when mail goes to the local fake (the dev mailbox page is shown only then). */
export function mailFakeActive(): boolean {
  return import.meta.env.TIDEMARK_DEMO === true && process.env.TIDEMARK_MAIL_FAKE === '1';
}

/** Sends one message: a plain-text part, and an HTML alternative when `html` is given. */
export async function sendMail(to: string, subject: string, text: string, html?: string): Promise<void> {
  // base64 keeps long links intact for anyone reading the raw message.
  await transport.sendMail({ from, to, subject, text, ...(html ? { html } : {}), textEncoding: 'base64' });
}

/** The public origin used in mailed links: TIDEMARK_ORIGIN when set, else the origin of the request. */
export function publicOrigin(url: URL): string {
  return process.env.TIDEMARK_ORIGIN ?? url.origin;
}
