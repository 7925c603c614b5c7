// The local OpenID Connect stand-in for Google (oauth2-mock-server on 127.0.0.1:OAUTH_STANDIN_PORT).
// /authorize signs in at once — as the demo subscriber, or as the address in `login_hint` — and the token and
// userinfo answers carry that person's claims (OpenID Connect Core 1.0 §5.1: sub, email, email_verified, name).
// A small page at /standin lets a person running the demo choose who "Google" signs in as.
import http from 'node:http';
import { createHash } from 'node:crypto';
import { OAuth2Issuer, OAuth2Service } from 'oauth2-mock-server';
import { DEMO_ACCOUNTS } from '../seed/demo-accounts.js';

export interface StandInIdentity {
  sub: string;
  email: string;
  name: string;
  email_verified: boolean;
}

/** Names the stand-in reports for the demo accounts, so a Google sign-in looks like the seeded person. */
const KNOWN_NAMES: Record<string, string> = Object.fromEntries(DEMO_ACCOUNTS.map((account) => [account.email, account.name]));
export const DEFAULT_STANDIN_EMAIL = 'omar.subscriber@demo.thence.test';

/** Returns a stable 21-digit subject for an address, shaped like Google's numeric `sub`. */
function subjectFor(email: string): string {
  const digest = createHash('sha256').update(email).digest();
  return (digest.readBigUInt64BE(0) * 1000n + BigInt(digest.readUInt16BE(8) % 1000)).toString().padStart(21, '1').slice(0, 21);
}

function nameFor(email: string): string {
  return KNOWN_NAMES[email] ?? email.split('@')[0].split(/[._+-]+/).filter(Boolean).map((part) => part[0].toUpperCase() + part.slice(1)).join(' ');
}

const EMAIL = /^[^\s@<>"]+@[^\s@<>"]+\.[^\s@<>"]+$/;

interface Options {
  port?: number;
  host?: string;
}

export interface OAuthStandIn {
  url: string;
  close(): Promise<void>;
}

export async function startOAuthStandIn(options: Options = {}): Promise<OAuthStandIn> {
  const port = options.port ?? Number(process.env.OAUTH_STANDIN_PORT ?? 8781);
  const host = options.host ?? '127.0.0.1';
  const issuer = new OAuth2Issuer();
  await issuer.keys.generate('RS256');
  const service = new OAuth2Service(issuer);

  // Registered details per address (PUT /standin/identities/ADDRESS) and who signs in without a hint.
  const registered = new Map<string, StandInIdentity>();
  let defaultEmail = DEFAULT_STANDIN_EMAIL;
  const identityFor = (email: string): StandInIdentity =>
    registered.get(email) ?? { sub: subjectFor(email), email, name: nameFor(email), email_verified: true };

  // code → identity (from /authorize), then access token → identity (from /token), read by /userinfo.
  const byCode = new Map<string, StandInIdentity>();
  const byAccessToken = new Map<string, StandInIdentity>();
  const remember = <V>(map: Map<string, V>, key: string, value: V) => {
    map.set(key, value);
    if (map.size > 1000) map.delete(map.keys().next().value!);
  };

  service.on('beforeAuthorizeRedirect', (redirect: { url: URL }, req: http.IncomingMessage) => {
    const query = new URL(req.url ?? '/', 'http://stand-in').searchParams;
    const hint = (query.get('login_hint') ?? '').trim().toLowerCase();
    const code = redirect.url.searchParams.get('code');
    if (code) remember(byCode, code, identityFor(EMAIL.test(hint) ? hint : defaultEmail));
  });
  service.on('beforeTokenSigning', (token: { payload: Record<string, unknown> }, req: http.IncomingMessage & { body?: Record<string, unknown> }) => {
    const identity = byCode.get(String(req.body?.code ?? ''));
    if (identity) Object.assign(token.payload, identity);
  });
  service.on('beforeResponse', (response: { body: Record<string, unknown> }, req: http.IncomingMessage & { body?: Record<string, unknown> }) => {
    const code = String(req.body?.code ?? '');
    const identity = byCode.get(code);
    if (identity && typeof response.body.access_token === 'string') {
      remember(byAccessToken, response.body.access_token, identity);
      byCode.delete(code);
    }
  });
  service.on('beforeUserinfo', (response: { body: unknown; statusCode: number }, req: http.IncomingMessage) => {
    const header = req.headers.authorization ?? '';
    const token = header.startsWith('Bearer ') ? header.slice(7) : new URL(req.url ?? '/', 'http://stand-in').searchParams.get('access_token') ?? '';
    const identity = byAccessToken.get(token);
    if (!identity) {
      response.statusCode = 401;
      response.body = { error: 'invalid_token', error_description: 'The access token is unknown to the stand-in.' };
      return;
    }
    const [given, ...family] = identity.name.split(' ');
    response.body = { ...identity, given_name: given, family_name: family.join(' ') || undefined };
  });

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://stand-in');
    if (!url.pathname.startsWith('/standin')) return service.requestHandler(req, res);
    handleAdmin(req, res, url).catch(() => send(res, 400, { error: 'bad_request', error_description: 'Send JSON.' }));
  });

  async function handleAdmin(req: http.IncomingMessage, res: http.ServerResponse, url: URL): Promise<void> {
    const identityPath = url.pathname.match(/^\/standin\/identities\/([^/]+)$/);
    if (url.pathname === '/standin' && req.method === 'GET') return sendPage(res, defaultEmail);
    if (url.pathname === '/standin/default' && req.method === 'GET') return send(res, 200, identityFor(defaultEmail));
    if (url.pathname === '/standin/default' && (req.method === 'PUT' || req.method === 'POST')) {
      const body = await readBody(req);
      const email = String((body.other || body.email) ?? '').trim().toLowerCase();
      if (!EMAIL.test(email)) return send(res, 400, { error: 'bad_request', error_description: 'Give an e-mail address in "email".' });
      defaultEmail = email;
      if (req.headers['content-type']?.includes('application/x-www-form-urlencoded')) {
        res.writeHead(303, { Location: '/standin' }).end();
        return;
      }
      return send(res, 200, identityFor(defaultEmail));
    }
    if (identityPath && req.method === 'PUT') {
      const email = decodeURIComponent(identityPath[1]).trim().toLowerCase();
      const body = await readBody(req);
      if (!EMAIL.test(email)) return send(res, 400, { error: 'bad_request', error_description: 'The path must end in an e-mail address.' });
      const identity: StandInIdentity = {
        sub: typeof body.sub === 'string' && body.sub ? body.sub : subjectFor(email),
        email,
        name: typeof body.name === 'string' && body.name ? body.name : nameFor(email),
        email_verified: body.email_verified !== false,
      };
      registered.set(email, identity);
      return send(res, 200, identity);
    }
    send(res, 404, { error: 'not_found', error_description: `No stand-in route ${req.method} ${url.pathname}.` });
  }

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  const address = server.address() as { port: number };
  issuer.url = `http://${host}:${address.port}`;
  console.log(`OpenID Connect stand-in on ${issuer.url} (signs in as ${defaultEmail}; choose at ${issuer.url}/standin)`);
  return {
    url: issuer.url,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

function send(res: http.ServerResponse, status: number, body: unknown): void {
  res.writeHead(status, { 'Content-Type': 'application/json; charset=utf-8' }).end(JSON.stringify(body));
}

async function readBody(req: http.IncomingMessage): Promise<Record<string, unknown>> {
  let text = '';
  for await (const chunk of req) {
    text += chunk;
    if (text.length > 10_000) throw new Error('body too large');
  }
  if (!text) return {};
  if (req.headers['content-type']?.includes('application/x-www-form-urlencoded')) return Object.fromEntries(new URLSearchParams(text));
  const parsed: unknown = JSON.parse(text);
  return parsed && typeof parsed === 'object' ? (parsed as Record<string, unknown>) : {};
}

const escapeHtml = (text: string): string => text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/** The chooser page: which account "Sign in with Google" signs in as, for the person running the demo. */
function sendPage(res: http.ServerResponse, current: string): void {
  const options = Object.entries(KNOWN_NAMES)
    .map(([email, name]) => `<li><label><input type="radio" name="email" value="${escapeHtml(email)}"${email === current ? ' checked' : ''}> ${escapeHtml(name)} &lt;${escapeHtml(email)}&gt;</label></li>`)
    .join('\n');
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Google stand-in</title>
<style>body{font:16px/1.5 system-ui,sans-serif;max-width:40rem;margin:2rem auto;padding:0 1rem}li{list-style:none;margin:.3rem 0}</style></head>
<body><h1>Local Google stand-in</h1>
<p>This is not Google. In development and tests, "Sign in with Google" on Thence comes here and signs in at once as the account chosen below.</p>
<form method="post" action="/standin/default"><ul>${options}</ul>
<p><label>or another address: <input type="email" name="other" placeholder="someone@example.test"></label></p>
<button type="submit">Sign in as this account from now on</button></form>
<p>Currently: <strong>${escapeHtml(current)}</strong></p></body></html>`;
  res.writeHead(200, { 'Content-Type': 'text/html; charset=utf-8', 'Content-Security-Policy': "default-src 'none'; style-src 'unsafe-inline'; form-action 'self'" }).end(html);
}
