// Reads the local SMTP catcher's JSON API (server/fakes/mail.ts) from tests: poll until a mail arrives.
import type { CaughtMail } from '../../server/fakes/mail.js';

export type { CaughtMail };

/** The catcher's viewer, from MAIL_VIEWER_URL (set by server/scripts/fakes-env.sh). */
export function mailViewerUrl(): string {
  const url = process.env.MAIL_VIEWER_URL;
  if (!url) throw new Error('MAIL_VIEWER_URL is not set: run through `npm test`, or eval "$(bash server/scripts/dev-env.sh)" and start `npx tsx server/fakes/main.ts`.');
  return url.replace(/\/$/, '');
}

export async function listMail(to: string): Promise<CaughtMail[]> {
  const res = await fetch(`${mailViewerUrl()}/api/messages?to=${encodeURIComponent(to)}`);
  if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
  return (await res.json()) as CaughtMail[];
}

/** Deletes the caught mail of one address (never everyone's: test files run in parallel). */
export async function clearMail(to: string): Promise<void> {
  await fetch(`${mailViewerUrl()}/api/messages?to=${encodeURIComponent(to)}`, { method: 'DELETE' });
}

/**
 * Waits for the newest mail to `to` whose subject matches, polling the catcher; fails with what did arrive.
 * `after` skips mail received before that moment (e.g. an earlier verification mail).
 */
export async function waitForMail(
  to: string,
  subjectMatch: RegExp | string,
  options: { timeoutMs?: number; after?: Date } = {},
): Promise<CaughtMail> {
  const deadline = Date.now() + (options.timeoutMs ?? 10_000);
  const matches = (mail: CaughtMail) =>
    (typeof subjectMatch === 'string' ? mail.subject.includes(subjectMatch) : subjectMatch.test(mail.subject)) &&
    (!options.after || new Date(mail.date) >= options.after);
  let seen: CaughtMail[] = [];
  while (Date.now() < deadline) {
    seen = await listMail(to);
    const found = seen.filter(matches).at(-1);
    if (found) return found;
    await new Promise((resolve) => setTimeout(resolve, 150));
  }
  throw new Error(`no mail to ${to} matching ${String(subjectMatch)} within ${options.timeoutMs ?? 10_000} ms; got: ${seen.map((m) => JSON.stringify(m.subject)).join(', ') || 'nothing'}`);
}

/** The first link in a mail's text that starts with the given prefix (e.g. `${publicUrl}/verify?token=`). */
export function linkIn(mail: CaughtMail, prefix: string): string {
  const link = mail.text.match(/https?:\/\/[^\s<>"]+/g)?.find((candidate) => candidate.startsWith(prefix));
  if (!link) throw new Error(`no link starting with ${prefix} in mail "${mail.subject}":\n${mail.text}`);
  return link;
}

/** The `token` query parameter of the first link with the given prefix. */
export function tokenIn(mail: CaughtMail, prefix: string): string {
  const token = new URL(linkIn(mail, prefix)).searchParams.get('token');
  if (!token) throw new Error(`the link in "${mail.subject}" carries no token`);
  return token;
}
