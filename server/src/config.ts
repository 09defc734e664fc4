import net from 'node:net';
import { z } from 'zod';

const onOff = z
  .string()
  .optional()
  .transform((v) => (v === undefined || v === '' ? undefined : !['0', 'off', 'false', 'no'].includes(v.toLowerCase())));

const envSchema = z.object({
  NODE_ENV: z.string().default('development'),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  PUBLIC_URL: z.string().optional(),
  DATABASE_URL: z.string().min(1, 'DATABASE_URL is required'),
  SESSION_SECRET: z.string().min(8, 'SESSION_SECRET must be at least 8 characters'),
  UPLOAD_DIR: z.string().optional(),
  STORAGE: z
    .string()
    .optional()
    .transform((v) => (v && v.trim() ? v.trim().toLowerCase() : 'disk'))
    .pipe(z.enum(['disk', 's3'], { message: 'STORAGE must be disk or s3' })),
  S3_ENDPOINT: z.string().optional(),
  S3_REGION: z.string().optional(),
  S3_BUCKET: z.string().optional(),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  BRINK_DEMO: onOff,
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Brink <no-reply@brink.invalid>'),
  MAIL_CATCHER: onOff,
  MAIL_CATCHER_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  PUSH_KEYS_FILE: z.string().optional(),
  PUSH_SUBJECT: z.string().optional(),
  PUSH_FAKE_SERVICE_URL: z.string().optional(),
  MAP_TILE_URL: z.string().optional(),
  MAP_TILE_ATTRIBUTION: z.string().optional(),
  SIGNIN_LIMIT_PER_IP: z.coerce.number().int().positive().default(30),
  SIGNIN_LIMIT_PER_ACCOUNT: z.coerce.number().int().positive().default(8),
  TRUST_PROXY: z
    .string()
    .optional()
    .transform((v) =>
      v && v.trim()
        ? v
            .split(',')
            .map((s) => s.trim())
            .filter(Boolean)
        : ['loopback'],
    )
    .refine((list) => list.every(isProxyAddress), {
      message: 'TRUST_PROXY must list addresses or subnets (e.g. 10.0.0.0/8, 192.0.2.7) or loopback, linklocal, uniquelocal',
    }),
});

/** Express's names for address ranges, or an IPv4/IPv6 address with an optional prefix length. */
function isProxyAddress(entry: string): boolean {
  if (['loopback', 'linklocal', 'uniquelocal'].includes(entry)) return true;
  const [address, prefix, ...rest] = entry.split('/');
  const family = net.isIP(address ?? '');
  if (family === 0 || rest.length > 0) return false;
  if (prefix === undefined) return true;
  const bits = Number(prefix);
  return /^\d+$/.test(prefix) && bits <= (family === 4 ? 32 : 128);
}

export interface Config {
  env: string;
  port: number;
  publicUrl: string;
  databaseUrl: string;
  sessionSecret: string;
  uploadDir: string;
  /**
   * Where uploads are kept: `disk` (UPLOAD_DIR, one machine) or `s3` (a bucket of an S3-compatible
   * object store, shared by every server; docs/scaling.md). UPLOAD_DIR stays readable under s3.
   */
  storage:
    | { kind: 'disk' }
    | { kind: 's3'; endpoint: string | null; region: string; bucket: string; accessKeyId: string | null; secretAccessKey: string | null };
  demo: boolean;
  smtpUrl: string | null;
  mailFrom: string;
  mailCatcher: { enabled: boolean; port: number };
  /**
   * Web Push: where the VAPID key pair is kept (made at first start), the contact the push services
   * see, and the local fake push service whose endpoints are accepted besides https ones.
   */
  push: { keysFile: string; subject: string; fakeServiceUrl: string | null };
  mapTileUrl: string | null;
  mapTileAttribution: string;
  signInLimitPerIp: number;
  signInLimitPerAccount: number;
  /**
   * The proxies whose X-Forwarded-For and X-Forwarded-Proto are believed (Express's `trust proxy`):
   * loopback by default; behind a load balancer on another host, its addresses or subnet.
   */
  trustProxy: string[];
}

/** Reads the settings from the environment (see .env.example); throws naming each bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    throw new Error(`bad settings: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  const e = parsed.data;
  const catcher = e.MAIL_CATCHER ?? e.NODE_ENV !== 'production';
  const empty = (s?: string) => (s && s.trim() ? s.trim() : null);
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    publicUrl: (empty(e.PUBLIC_URL) ?? `http://localhost:${e.PORT}`).replace(/\/$/, ''),
    databaseUrl: e.DATABASE_URL,
    sessionSecret: e.SESSION_SECRET,
    uploadDir: empty(e.UPLOAD_DIR) ?? '.data/uploads',
    storage:
      e.STORAGE === 'disk'
        ? { kind: 'disk' }
        : {
            kind: 's3',
            endpoint: empty(e.S3_ENDPOINT)?.replace(/\/$/, '') ?? null,
            region: empty(e.S3_REGION) ?? 'us-east-1',
            bucket: empty(e.S3_BUCKET) ?? 'brink-uploads',
            accessKeyId: empty(e.S3_ACCESS_KEY_ID),
            secretAccessKey: empty(e.S3_SECRET_ACCESS_KEY),
          },
    demo: e.BRINK_DEMO ?? false,
    smtpUrl: empty(e.SMTP_URL) ?? (catcher ? `smtp://127.0.0.1:${e.MAIL_CATCHER_PORT}` : null),
    mailFrom: e.MAIL_FROM,
    mailCatcher: { enabled: catcher, port: e.MAIL_CATCHER_PORT },
    push: {
      keysFile: empty(e.PUSH_KEYS_FILE) ?? '.data/vapid-keys.json',
      subject: empty(e.PUSH_SUBJECT) ?? `mailto:${/<([^>]+)>/.exec(e.MAIL_FROM)?.[1] ?? 'no-reply@brink.invalid'}`,
      fakeServiceUrl: empty(e.PUSH_FAKE_SERVICE_URL)?.replace(/\/$/, '') ?? null,
    },
    mapTileUrl: empty(e.MAP_TILE_URL),
    mapTileAttribution: e.MAP_TILE_ATTRIBUTION ?? '',
    signInLimitPerIp: e.SIGNIN_LIMIT_PER_IP,
    signInLimitPerAccount: e.SIGNIN_LIMIT_PER_ACCOUNT,
    trustProxy: e.TRUST_PROXY,
  };
}
