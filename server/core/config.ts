import path from 'node:path';

export type DemoMode = 'full' | 'accounts' | 'off';

/** Every setting Kinefold reads from the environment, with its default, in one place. */
export interface Config {
  port: number;
  storageDir: string;
  /** `postgres://…` from KINEFOLD_DATABASE_URL: PostgreSQL instead of the SQLite file under the storage root. */
  databaseUrl: string | null;
  /**
   * A CA certificate file (PEM) for TLS to PostgreSQL (KINEFOLD_DATABASE_CA): with it the server's certificate must
   * chain to this CA and, unless the URL's sslmode says otherwise, name the URL's host (db/postgres-tls.ts).
   */
  databaseCa: string | null;
  /** `s3://bucket/prefix` (KINEFOLD_OBJECT_STORE): sources, derived files and shards go there; null keeps storageDir. */
  objectStore: string | null;
  /**
   * A worker's local folder beside a bucket (KINEFOLD_SCRATCH_DIR, default `<storageDir>/scratch`): stages copy a
   * clip's stored files here, work on them and publish their outputs to the bucket. Unused with the storage folder.
   */
  scratchDir: string;
  /** An S3-compatible service other than AWS (KINEFOLD_S3_ENDPOINT); null lets the SDK pick AWS's. */
  s3Endpoint: string | null;
  /** AWS_REGION or AWS_DEFAULT_REGION; other S3-compatible services accept any, so one is always given. */
  s3Region: string;
  demo: DemoMode;
  smtpUrl: string | null;
  /** The base of every link Kinefold mails; by default this server on its own port. */
  publicUrl: string;
  /** Whether publicUrl was set (KINEFOLD_PUBLIC_URL) or derived from PORT, for the admin's settings. */
  publicUrlSource: 'configured' | 'derived';
  sessionSecret: string;
  sessionMaxAgeMs: number;
  /** True when the server sits behind TLS: cookies get `secure`, helmet adds HSTS. */
  tls: boolean;
  signInLimitPerIp: number;
  signInLimitPerAccount: number;
  signInWindowMs: number;
  bcryptCost: number;
  /** The sender of every message Kinefold mails. */
  mailFrom: string;
  resetLimitPerIp: number;
  resetLimitPerAccount: number;
  resetWindowMs: number;
  /** Largest file one upload may carry. */
  uploadLimitBytes: number;
  /** A resumable upload that receives no byte for this long is removed and its reserved bytes released. */
  resumableIdleMs: number;
  /** Seconds a worker holds a claimed job before another may take it over; renewed every third of it. */
  jobLeaseS: number;
  /** Jobs one worker process runs at once. */
  jobConcurrency: number;
  /** CPU niceness of the worker process (0–19): above 0 the server keeps answering quickly while clips process. */
  workerNice: number;
}

/** The lowest CPU priority Linux gives. */
const MAX_NICE = 19;

function parseDemo(value: string | undefined): DemoMode {
  const mode = value ?? 'full';
  if (mode !== 'full' && mode !== 'accounts' && mode !== 'off') {
    throw new Error(`KINEFOLD_DEMO must be full, accounts or off (got "${mode}")`);
  }
  return mode;
}

function parseInteger(name: string, value: string | undefined, fallback: number): number {
  if (value === undefined || value === '') return fallback;
  const parsed = Number(value);
  if (!Number.isInteger(parsed) || parsed < 0) throw new Error(`${name} must be a whole number (got "${value}")`);
  return parsed;
}

function parseDatabaseUrl(value: string | undefined): string | null {
  if (!value) return null;
  if (!/^postgres(ql)?:\/\/[^/]/.test(value)) {
    throw new Error('KINEFOLD_DATABASE_URL must be a postgres:// URL (unset it to use SQLite)');
  }
  return value;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const port = parseInteger('PORT', env.PORT, 3000);
  // Links must reach this server: without a configured address, the one it listens on is the best guess.
  const publicUrl = env.KINEFOLD_PUBLIC_URL || `http://localhost:${port}`;
  const storageDir = path.resolve(env.KINEFOLD_STORAGE_DIR ?? 'storage');
  return {
    port,
    storageDir,
    databaseUrl: parseDatabaseUrl(env.KINEFOLD_DATABASE_URL),
    databaseCa: env.KINEFOLD_DATABASE_CA ? path.resolve(env.KINEFOLD_DATABASE_CA) : null,
    objectStore: env.KINEFOLD_OBJECT_STORE || null,
    scratchDir: path.resolve(env.KINEFOLD_SCRATCH_DIR || path.join(storageDir, 'scratch')),
    s3Endpoint: env.KINEFOLD_S3_ENDPOINT || null,
    s3Region: env.AWS_REGION || env.AWS_DEFAULT_REGION || 'us-east-1',
    demo: parseDemo(env.KINEFOLD_DEMO),
    smtpUrl: env.SMTP_URL || null,
    publicUrl,
    publicUrlSource: env.KINEFOLD_PUBLIC_URL ? 'configured' : 'derived',
    sessionSecret: env.KINEFOLD_SESSION_SECRET ?? '',
    sessionMaxAgeMs: parseInteger('KINEFOLD_SESSION_HOURS', env.KINEFOLD_SESSION_HOURS, 12) * 3600_000,
    tls: env.KINEFOLD_TLS === '1' || publicUrl.startsWith('https://'),
    signInLimitPerIp: parseInteger('KINEFOLD_SIGNIN_LIMIT_IP', env.KINEFOLD_SIGNIN_LIMIT_IP, 30),
    signInLimitPerAccount: parseInteger('KINEFOLD_SIGNIN_LIMIT_ACCOUNT', env.KINEFOLD_SIGNIN_LIMIT_ACCOUNT, 8),
    signInWindowMs: 15 * 60_000,
    bcryptCost: parseInteger('KINEFOLD_BCRYPT_COST', env.KINEFOLD_BCRYPT_COST, 12),
    mailFrom: env.KINEFOLD_MAIL_FROM || `Kinefold <kinefold@${new URL(publicUrl).hostname}>`,
    resetLimitPerIp: parseInteger('KINEFOLD_RESET_LIMIT_IP', env.KINEFOLD_RESET_LIMIT_IP, 10),
    resetLimitPerAccount: parseInteger('KINEFOLD_RESET_LIMIT_ACCOUNT', env.KINEFOLD_RESET_LIMIT_ACCOUNT, 3),
    resetWindowMs: 60 * 60_000,
    uploadLimitBytes: parseInteger('KINEFOLD_UPLOAD_LIMIT_BYTES', env.KINEFOLD_UPLOAD_LIMIT_BYTES, 4 * 1024 ** 3),
    resumableIdleMs: parseInteger('KINEFOLD_RESUMABLE_IDLE_HOURS', env.KINEFOLD_RESUMABLE_IDLE_HOURS, 24) * 3600_000,
    jobLeaseS: Math.max(1, parseInteger('KINEFOLD_JOB_LEASE_S', env.KINEFOLD_JOB_LEASE_S, 60)),
    jobConcurrency: Math.max(1, parseInteger('KINEFOLD_JOB_CONCURRENCY', env.KINEFOLD_JOB_CONCURRENCY, 2)),
    workerNice: Math.min(MAX_NICE, parseInteger('KINEFOLD_WORKER_NICE', env.KINEFOLD_WORKER_NICE, 10)),
  };
}

/** Where the SQLite file lives under the storage root (DESIGN §6). */
export function databasePath(config: Pick<Config, 'storageDir'>): string {
  return path.join(config.storageDir, 'db', 'kinefold.sqlite');
}
