// Test harness for API tests: a context and app on the real PostgreSQL test database, and supertest agents
// that carry a session cookie and the CSRF token, optionally signed in as a fresh user with given roles.
import { randomUUID } from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import supertest from 'supertest';
import { createApp } from '../../server/app.js';
import { closeContext, createContext } from '../../server/bootstrap.js';
import { loadConfig, type Config } from '../../server/config.js';
import type { AppContext } from '../../server/context.js';
import { closeMail } from '../../server/services/mail.js';
import { createPasswordUser, hashPassword } from '../../server/services/users.js';
import type { Role } from '../../shared/roles.js';

export type ConfigOverrides = Partial<Omit<Config, 'mail' | 'google' | 'stripe'>> & {
  mail?: Partial<Config['mail']>;
  google?: Partial<Config['google']>;
  stripe?: Partial<Config['stripe']>;
};

/** The configuration tests run with: the environment (see server/scripts/dev-env.sh) plus overrides. */
export function testConfig(overrides: ConfigOverrides = {}): Config {
  const base = loadConfig(process.env);
  return {
    ...base,
    ...overrides,
    mail: { ...base.mail, ...overrides.mail },
    google: { ...base.google, ...overrides.google },
    stripe: { ...base.stripe, ...overrides.stripe },
  } as Config;
}

export function createTestContext(overrides: ConfigOverrides = {}): Promise<AppContext> {
  return createContext(testConfig(overrides));
}

export interface TestApp {
  app: Express;
  ctx: AppContext;
  close(): Promise<void>;
}

/** An app on its own context (own pools); close() releases them. */
export async function createTestApp(overrides: ConfigOverrides = {}): Promise<TestApp> {
  const ctx = await createTestContext(overrides);
  const app = createApp(ctx);
  return {
    app,
    ctx,
    close: async () => {
      closeMail(ctx);
      await closeContext(ctx);
    },
  };
}

export interface TestServer extends TestApp {
  /** e.g. http://127.0.0.1:41234 — also the context's publicUrl, so mailed links and OAuth callbacks point here. */
  url: string;
}

/**
 * The app listening on a free loopback port (for browser journeys): the port is bound first, so the
 * configuration's publicUrl (used in mail links and the Google callback) is the real address.
 */
export async function startTestServer(overrides: ConfigOverrides = {}): Promise<TestServer> {
  const server = http.createServer();
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://127.0.0.1:${port}`;
  const testApp = await createTestApp({ port, host: '127.0.0.1', publicUrl: url, cookieSecure: false, ...overrides });
  server.on('request', testApp.app);
  return {
    ...testApp,
    url,
    close: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await testApp.close();
    },
  };
}

/** A unique e-mail address for one test (files run in parallel on one database). */
export function uniqueEmail(label = 'user'): string {
  return `${label}.${randomUUID().slice(0, 12)}@example.test`;
}

/** The password every helper-made user has. */
export const TEST_PASSWORD = 'correct-horse-battery-2026';
let testPasswordHash: Promise<string> | null = null;
/** Hashed once per process: bcrypt at cost 12 takes a while, and only the sign-in path needs the real cost. */
const passwordHash = () => (testPasswordHash ??= hashPassword(TEST_PASSWORD));

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

/**
 * A supertest agent (cookie jar) that sends X-CSRF-Token on writes. The token is bound to the session id,
 * which changes on sign-in and sign-out: call refreshCsrf() after those (signIn/signOut here do it).
 */
export class TestAgent {
  readonly agent: ReturnType<typeof supertest.agent>;
  private token = '';

  constructor(readonly app: Express) {
    this.agent = supertest.agent(app);
  }

  async refreshCsrf(): Promise<string> {
    const res = await this.agent.get('/api/csrf').expect(200);
    this.token = (res.body as { token: string }).token;
    return this.token;
  }

  get csrfToken(): string {
    return this.token;
  }

  get(url: string) {
    return this.agent.get(url).set('Accept', 'application/json');
  }
  post(url: string) {
    return this.write('post', url);
  }
  put(url: string) {
    return this.write('put', url);
  }
  patch(url: string) {
    return this.write('patch', url);
  }
  delete(url: string) {
    return this.write('delete', url);
  }

  private write(method: Exclude<Method, 'get'>, url: string) {
    return this.agent[method](url).set('Accept', 'application/json').set('X-CSRF-Token', this.token);
  }

  async signIn(email: string, password: string = TEST_PASSWORD): Promise<supertest.Response> {
    await this.refreshCsrf();
    const res = await this.post('/api/auth/sign-in').send({ email, password });
    await this.refreshCsrf();
    return res;
  }

  async signOut(): Promise<void> {
    await this.post('/api/auth/sign-out').expect(204);
    await this.refreshCsrf();
  }
}

/** A signed-out agent with a CSRF token ready. */
export async function guestAgent(app: Express): Promise<TestAgent> {
  const agent = new TestAgent(app);
  await agent.refreshCsrf();
  return agent;
}

export interface TestUser {
  id: string;
  email: string;
  name: string;
  password: string;
  roles: Role[];
}

/** Creates a verified user directly in the database (no mail round trip). */
export async function createTestUser(
  ctx: AppContext,
  options: { roles?: Role[]; email?: string; name?: string; verified?: boolean } = {},
): Promise<TestUser> {
  const roles = options.roles ?? ['subscriber'];
  const email = options.email ?? uniqueEmail(roles.join('-') || 'none');
  const name = options.name ?? `Test ${roles.join(' ') || 'user'}`;
  const user = await createPasswordUser(ctx, { name, email, password: TEST_PASSWORD, roles }, { verified: options.verified ?? true, passwordHash: await passwordHash() });
  return { id: user.id, email: user.email, name: user.name, password: TEST_PASSWORD, roles: [...user.roles] };
}

/** An agent signed in (through POST /api/auth/sign-in) as a new verified user with the given roles. */
export async function signedInAgent(
  target: TestApp | { app: Express; ctx: AppContext },
  options: { roles?: Role[]; email?: string; name?: string; verified?: boolean } = {},
): Promise<TestAgent & { user: TestUser }> {
  const user = await createTestUser(target.ctx, options);
  const agent = new TestAgent(target.app);
  const res = await agent.signIn(user.email, user.password);
  if (res.status !== 200) throw new Error(`test sign-in as ${user.email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return Object.assign(agent, { user });
}
