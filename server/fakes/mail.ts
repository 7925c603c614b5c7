// The local SMTP catcher: accepts every mail on 127.0.0.1:SMTP_PORT, keeps it (in memory and as JSON files under
// $THENCE_DATA_DIR/mail so it survives a restart) and shows it on 127.0.0.1:MAIL_VIEWER_PORT: an HTML inbox
// for people and a JSON API for tests (GET /api/messages?to=ADDRESS, DELETE /api/messages).
import http from 'node:http';
import fs from 'node:fs/promises';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';

export interface CaughtMail {
  id: string;
  /** Envelope recipients, comma-separated. */
  to: string;
  from: string;
  subject: string;
  text: string;
  html: string;
  /** ISO 8601, when the catcher received it. */
  date: string;
}

interface Options {
  smtpPort?: number;
  viewerPort?: number;
  host?: string;
  dir?: string;
}

export interface MailCatcher {
  smtpPort: number;
  viewerUrl: string;
  close(): Promise<void>;
}

const ID = /^[0-9a-z-]{10,64}$/;

export async function startMailCatcher(options: Options = {}): Promise<MailCatcher> {
  const host = options.host ?? '127.0.0.1';
  const smtpPort = options.smtpPort ?? Number(process.env.SMTP_PORT ?? 8725);
  const viewerPort = options.viewerPort ?? Number(process.env.MAIL_VIEWER_PORT ?? 8782);
  const dir = options.dir ?? path.join(process.env.THENCE_DATA_DIR ?? '.data', 'mail');
  await fs.mkdir(dir, { recursive: true });
  const messages = await loadMessages(dir);

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    banner: 'Thence local mail catcher',
    size: 10 * 1024 * 1024,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const mail: CaughtMail = {
            id: `${Date.now().toString(36)}-${randomBytes(6).toString('hex')}`,
            to: session.envelope.rcptTo.map((rcpt) => rcpt.address.toLowerCase()).join(', '),
            from: parsed.from?.text ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            date: new Date().toISOString(),
          };
          await fs.writeFile(path.join(dir, `${mail.id}.json`), JSON.stringify(mail, null, 2));
          messages.push(mail);
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.server.once('error', reject);
    smtp.listen(smtpPort, host, () => resolve());
  });

  const viewer = http.createServer((req, res) => {
    handle(req, res).catch((error: Error) => json(res, 500, { error: { code: 'internal_error', message: error.message } }));
  });

  async function handle(req: http.IncomingMessage, res: http.ServerResponse): Promise<void> {
    const url = new URL(req.url ?? '/', 'http://viewer');
    const to = url.searchParams.get('to')?.trim().toLowerCase();
    const forAddress = (mail: CaughtMail) => !to || mail.to.split(', ').includes(to);
    const one = url.pathname.match(/^\/(?:api\/)?messages\/([^/]+)$/);
    if (url.pathname === '/api/messages' && req.method === 'GET') return json(res, 200, messages.filter(forAddress));
    if (url.pathname === '/api/messages' && req.method === 'DELETE') {
      const doomed = messages.filter(forAddress);
      await Promise.all(doomed.map((mail) => fs.rm(path.join(dir, `${mail.id}.json`), { force: true })));
      const keep = messages.filter((mail) => !doomed.includes(mail));
      messages.splice(0, messages.length, ...keep);
      res.writeHead(204).end();
      return;
    }
    if (one && req.method === 'GET') {
      const mail = ID.test(one[1]) ? messages.find((m) => m.id === one[1]) : undefined;
      if (url.pathname.startsWith('/api/')) return mail ? json(res, 200, mail) : json(res, 404, { error: { code: 'not_found', message: 'No such message.' } });
      return mail ? page(res, 200, mail.subject || '(no subject)', messageHtml(mail)) : page(res, 404, 'Not found', '<p>No such message. <a href="/">Back to the inbox</a></p>');
    }
    if (url.pathname === '/' && req.method === 'GET') return page(res, 200, 'Demo mail', inboxHtml(messages.filter(forAddress), to));
    if (url.pathname.startsWith('/api/')) return json(res, 404, { error: { code: 'not_found', message: `No route ${req.method} ${url.pathname}.` } });
    page(res, 404, 'Not found', '<p>Nothing here. <a href="/">Back to the inbox</a></p>');
  }

  await new Promise<void>((resolve, reject) => {
    viewer.once('error', reject);
    viewer.listen(viewerPort, host, () => resolve());
  });
  const boundSmtp = (smtp.server.address() as { port: number }).port;
  const viewerUrl = `http://${host}:${(viewer.address() as { port: number }).port}`;
  console.log(`mail catcher: SMTP on ${host}:${boundSmtp}, inbox on ${viewerUrl}`);
  return {
    smtpPort: boundSmtp,
    viewerUrl,
    close: async () => {
      await Promise.all([new Promise<void>((resolve) => smtp.close(() => resolve())), new Promise<void>((resolve) => viewer.close(() => resolve()))]);
    },
  };
}

/** Reads the kept messages back, oldest first; unreadable files are skipped with a note, not fatal. */
async function loadMessages(dir: string): Promise<CaughtMail[]> {
  const found: CaughtMail[] = [];
  for (const name of await fs.readdir(dir)) {
    if (!name.endsWith('.json')) continue;
    try {
      found.push(JSON.parse(await fs.readFile(path.join(dir, name), 'utf8')) as CaughtMail);
    } catch (error) {
      console.error(`mail catcher: skipping ${name}: ${(error as Error).message}`);
    }
  }
  return found.sort((a, b) => a.date.localeCompare(b.date));
}

function json(res: http.ServerResponse, status: number, body: unknown): void {
  res.writeHead(status, { 'Content-Type': 'application/json; charset=utf-8' }).end(JSON.stringify(body));
}

const escapeHtml = (text: string): string => text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** Escapes the text and turns http(s) addresses into links, so the demo's verification links can be clicked. */
function linkify(text: string): string {
  return text
    .split(/(https?:\/\/[^\s<>"]+)/g)
    .map((part, i) => (i % 2 === 1 ? `<a href="${escapeHtml(part)}">${escapeHtml(part)}</a>` : escapeHtml(part)))
    .join('');
}

function inboxHtml(messages: CaughtMail[], to: string | undefined): string {
  const rows = [...messages]
    .reverse()
    .map((m) => `<tr><td>${escapeHtml(new Date(m.date).toLocaleString('en-GB', { timeZone: 'UTC' }))} UTC</td><td>${escapeHtml(m.to)}</td><td><a href="/messages/${escapeHtml(m.id)}">${escapeHtml(m.subject || '(no subject)')}</a></td></tr>`)
    .join('\n');
  return `<h1>Demo mail${to ? ` for ${escapeHtml(to)}` : ''}</h1>
<p>Every mail Thence sends in this local set-up lands here instead of a real inbox. ${to ? '<a href="/">Show all</a>' : ''}</p>
<form method="get" action="/"><label>Only mail to <input type="email" name="to" value="${escapeHtml(to ?? '')}"></label> <button>Filter</button></form>
${messages.length ? `<table><thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead><tbody>${rows}</tbody></table>` : '<p>No mail yet.</p>'}`;
}

function messageHtml(m: CaughtMail): string {
  return `<p><a href="/">← Inbox</a></p><h1>${escapeHtml(m.subject || '(no subject)')}</h1>
<dl><dt>From</dt><dd>${escapeHtml(m.from)}</dd><dt>To</dt><dd>${escapeHtml(m.to)}</dd><dt>Received</dt><dd>${escapeHtml(m.date)}</dd></dl>
<pre>${linkify(m.text)}</pre>`;
}

function page(res: http.ServerResponse, status: number, title: string, body: string): void {
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(title)}</title>
<style>body{font:16px/1.5 system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1d2430}table{border-collapse:collapse;width:100%}td,th{text-align:left;padding:.35rem .5rem;border-bottom:1px solid #dde}pre{white-space:pre-wrap;background:#f6f7f9;padding:1rem;border-radius:6px}dt{font-weight:600}dd{margin:0 0 .4rem}</style>
</head><body>${body}</body></html>`;
  // No scripts and no remote content: the mail's own HTML is never rendered, only its text part.
  res.writeHead(status, { 'Content-Type': 'text/html; charset=utf-8', 'Content-Security-Policy': "default-src 'none'; style-src 'unsafe-inline'; form-action 'self'" }).end(html);
}
