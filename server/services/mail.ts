// Outgoing mail through nodemailer: verification and password-reset links. In development and tests the SMTP
// server is the local catcher (server/fakes/mail.ts); in production SMTP_HOST/SMTP_PORT point at a real relay.
import nodemailer, { type Transporter } from 'nodemailer';
import type { AppContext } from '../context.js';

const transports = new WeakMap<AppContext, Transporter>();

function transportFor(ctx: AppContext): Transporter {
  let transport = transports.get(ctx);
  if (!transport) {
    const { host, port, user, password } = ctx.config.mail;
    const loopback = host === '127.0.0.1' || host === 'localhost' || host === '::1';
    transport = nodemailer.createTransport({
      host,
      port,
      secure: port === 465,
      // The loopback catcher speaks plain SMTP; anywhere else STARTTLS is required.
      ignoreTLS: loopback,
      requireTLS: !loopback && port !== 465,
      ...(user ? { auth: { user, pass: password ?? '' } } : {}),
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
    });
    transports.set(ctx, transport);
  }
  return transport;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string;
}

export async function sendMail(ctx: AppContext, mail: OutgoingMail): Promise<void> {
  await transportFor(ctx).sendMail({ from: ctx.config.mail.from, ...mail });
}

/** Closes the pooled SMTP connections of a context (tests and shutdown). */
export function closeMail(ctx: AppContext): void {
  transports.get(ctx)?.close();
  transports.delete(ctx);
}

const escapeHtml = (text: string): string =>
  text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** A plain mail with one call to action: the same words as text and as simple HTML. */
function linkMail(to: string, subject: string, greeting: string, lines: string[], action: string, link: string): OutgoingMail {
  const text = [greeting, '', ...lines, '', `${action}: ${link}`, '', 'If you did not ask for this, you can ignore this mail.', '', '— Thence'].join('\n');
  const html = [
    `<p>${escapeHtml(greeting)}</p>`,
    ...lines.map((line) => `<p>${escapeHtml(line)}</p>`),
    `<p><a href="${escapeHtml(link)}">${escapeHtml(action)}</a></p>`,
    `<p style="color:#666">If the button does not work, open this address: ${escapeHtml(link)}</p>`,
    '<p style="color:#666">If you did not ask for this, you can ignore this mail.</p>',
    '<p>— Thence</p>',
  ].join('\n');
  return { to, subject, text, html };
}

export function verificationMail(ctx: AppContext, to: { email: string; name: string }, token: string): OutgoingMail {
  const link = `${ctx.config.publicUrl}/verify?token=${encodeURIComponent(token)}`;
  return linkMail(
    to.email,
    'Confirm your e-mail address for Thence',
    `Hello ${to.name},`,
    ['Please confirm that this is your e-mail address. The link works once and for 24 hours.'],
    'Confirm my address',
    link,
  );
}

export function passwordResetMail(ctx: AppContext, to: { email: string; name: string }, token: string): OutgoingMail {
  const link = `${ctx.config.publicUrl}/reset?token=${encodeURIComponent(token)}`;
  return linkMail(
    to.email,
    'Choose a new Thence password',
    `Hello ${to.name},`,
    ['Someone (hopefully you) asked to reset the password of this Thence account. The link works once and for one hour.'],
    'Choose a new password',
    link,
  );
}
