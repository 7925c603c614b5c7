// Server configuration, read once from the environment; every default is for a local loopback setup.

export interface Config {
  readonly port: number;
  readonly host: string;
  readonly publicUrl: string;
  readonly databaseUrl: string;
  readonly sessionSecret: string;
  readonly cookieSecure: boolean;
  readonly dataDir: string;
  readonly uploadDir: string;
  readonly clientDist: string;
  readonly mail: { readonly host: string; readonly port: number; readonly from: string; readonly viewerUrl: string | null; readonly user: string | null; readonly password: string | null };
  readonly google: { readonly clientId: string; readonly clientSecret: string; readonly issuer: string | null };
  readonly stripe: {
    readonly secretKey: string;
    readonly webhookSecret: string;
    readonly host: string | null;
    readonly port: number | null;
    readonly protocol: 'http' | 'https';
    readonly platformFeePercent: number;
  };
}

function int(value: string | undefined, fallback: number): number {
  const parsed = value === undefined || value === '' ? NaN : Number(value);
  return Number.isInteger(parsed) ? parsed : fallback;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = int(env.PORT, 8080);
  const host = env.HOST ?? '127.0.0.1';
  const publicUrl = (env.PUBLIC_URL ?? `http://${host}:${port}`).replace(/\/$/, '');
  const dataDir = env.THENCE_DATA_DIR ?? '.data';
  return {
    port,
    host,
    publicUrl,
    databaseUrl: env.DATABASE_URL ?? 'postgres://postgres@127.0.0.1:54329/thence',
    sessionSecret: env.SESSION_SECRET ?? 'local-development-session-secret-change-me',
    // Secure cookies are only sent over HTTPS; on plain-HTTP loopback they would never come back.
    cookieSecure: env.COOKIE_SECURE ? env.COOKIE_SECURE === 'true' : publicUrl.startsWith('https://'),
    dataDir,
    uploadDir: env.UPLOAD_DIR ?? `${dataDir}/uploads`,
    clientDist: env.CLIENT_DIST ?? 'dist',
    mail: {
      host: env.SMTP_HOST ?? '127.0.0.1',
      port: int(env.SMTP_PORT, 8725),
      from: env.MAIL_FROM ?? 'Thence <no-reply@thence.test>',
      viewerUrl: env.MAIL_VIEWER_URL ?? null,
      // A real relay usually wants a login; the local catcher takes none.
      user: env.SMTP_USER || null,
      password: env.SMTP_PASSWORD || null,
    },
    google: {
      clientId: env.GOOGLE_CLIENT_ID ?? '',
      clientSecret: env.GOOGLE_CLIENT_SECRET ?? '',
      // Set only for the local OpenID Connect stand-in; unset means real Google endpoints.
      issuer: env.GOOGLE_OAUTH_ISSUER ?? null,
    },
    stripe: {
      secretKey: env.STRIPE_SECRET_KEY ?? '',
      webhookSecret: env.STRIPE_WEBHOOK_SECRET ?? '',
      host: env.STRIPE_API_HOST ?? null,
      port: env.STRIPE_API_PORT ? int(env.STRIPE_API_PORT, 0) : null,
      protocol: env.STRIPE_API_PROTOCOL === 'http' ? 'http' : 'https',
      platformFeePercent: int(env.PLATFORM_FEE_PERCENT, 15),
    },
  };
}

export const config: Config = loadConfig();
