import * as z from 'zod';

/**
 * Every setting the API server and the worker read, checked once at start-up. Each key has a default for
 * development and an environment variable; a bad value stops the process with a message naming the variable.
 */
const schema = z.object({
  nodeEnv: z.enum(['development', 'production', 'test']).default('development'),
  port: z.coerce.number().int().min(0).max(65535).default(8640),
  host: z.string().default('127.0.0.1'),
  publicUrl: z.url().default('http://127.0.0.1:8640'),
  databaseUrl: z.string().startsWith('postgres').default('postgres://postgres@127.0.0.1:5544/gatepost'),
  redisUrl: z.string().startsWith('redis').default('redis://127.0.0.1:6391'),
  dataDir: z.string().default('.data'),
  jwtSecret: z.string().min(32, 'must be at least 32 characters').default('development-only-secret-change-me-0123456789'),
  /** Browser session lifetime. */
  sessionHours: z.coerce.number().positive().max(24 * 30).default(12),
  smtpHost: z.string().default('127.0.0.1'),
  smtpPort: z.coerce.number().int().min(1).max(65535).default(2526),
  smtpSecure: z.stringbool().default(false),
  smtpUser: z.string().optional(),
  smtpPassword: z.string().optional(),
  mailFrom: z.string().default('Gatepost <no-reply@gatepost.invalid>'),
  /** "fake": mail goes to the local fake SMTP server and admins can read it in the app (development, tests). */
  mailOutbox: z.enum(['fake', 'smtp']).default('fake'),
  /** Failed sign-ins allowed on one account from one address in a window before that address is refused for it. */
  loginMaxFailures: z.coerce.number().int().min(1).default(5),
  loginWindowSeconds: z.coerce.number().int().min(1).default(15 * 60),
  /** Progressive delay of sign-ins once failures pile up: first step, doubling up to the longest, ms. */
  loginDelayStepMs: z.coerce.number().int().min(0).default(250),
  loginMaxDelayMs: z.coerce.number().int().min(0).default(8000),
  /** How long a password reset link works, minutes. */
  passwordResetMinutes: z.coerce.number().int().min(5).max(24 * 60).default(30),
  /** Reset e-mails sent to one address per hour at most; further requests get the same answer and no mail. */
  passwordResetMailsPerHour: z.coerce.number().int().min(1).default(3),
  /**
   * The reverse proxy in front of the API, whose X-Forwarded-For is believed (the client's address for sign-in
   * limits and the audit trail): addresses or subnets, comma-separated (e.g. "127.0.0.1" or "10.0.0.0/8"). Unset:
   * no proxy, the header is ignored, so no local client can forge its address.
   */
  trustProxy: z.string().default(''),
  logLevel: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  clientDir: z.string().default('dist/client'),
  /** Where raw files and channel files are kept: "local" (under `<dataDir>/blobs`) or an S3-compatible bucket. */
  storage: z.enum(['local', 's3']).default('local'),
  /** S3 endpoint URL; unset means AWS itself. */
  s3Endpoint: z.url().optional(),
  s3Region: z.string().min(1).default('us-east-1'),
  s3Bucket: z.string().min(3).optional(),
  /** Unset access keys fall back to the AWS SDK's default credential chain (instance role, profile). */
  s3AccessKeyId: z.string().optional(),
  s3SecretAccessKey: z.string().optional(),
  /** Bucket in the URL path (most self-hosted S3-compatible servers need it). */
  s3ForcePathStyle: z.stringbool().default(true),
  /** Largest scope file one upload may carry. */
  uploadLimitBytes: z.coerce.number().int().positive().default(2 * 1024 ** 3),
  /**
   * Uploads at least this large (the request's length) are read by the API while their bytes arrive, in a thread,
   * so their channels are stored when the last byte is; smaller ones are read by the worker. -1: never.
   */
  readUploadsFromBytes: z.coerce.number().int().min(-1).default(16 * 1024 ** 2),
  /** Largest upload request (all its files together), refused from its Content-Length before anything is read. */
  uploadRequestLimitBytes: z.coerce.number().int().positive().default(4 * 1024 ** 3),
  /** Most channels one capture file may hold; a file with more is refused before its samples are read. */
  maxChannelsPerCapture: z.coerce.number().int().min(1).default(64),
  /** Most samples per channel of one capture file (a deep scope record holds tens of millions). */
  maxSamplesPerChannel: z.coerce.number().int().min(2).default(50_000_000),
  /** Storage each lab may fill (raw files plus the channel files read from them); 0 for no quota. */
  labStorageQuotaBytes: z.coerce.number().int().min(0).default(50 * 1024 ** 3),
  /** How long a worker holds a job before another may take it over (stalled-job recovery), ms. */
  jobLockMs: z.coerce.number().int().min(1000).default(30_000),
  /** How often the worker re-queues captures and analyses whose job never reached Redis, ms. */
  sweepIntervalMs: z.coerce.number().int().min(200).default(15_000),
  /**
   * Processor cores the worker processes of this host share (worker/host-share.ts); unset: the cores this process
   * may run on (os.availableParallelism()).
   */
  workerCores: z.coerce.number().int().min(1).optional(),
  /** Jobs of each reading queue (ingest, analysis) one worker process runs at once, fixed; unset: its share of the host's cores. */
  workerConcurrency: z.coerce.number().int().min(1).optional(),
  /** Name under which worker processes count each other as sharing one machine; unset: the host name. */
  workerHost: z.string().min(1).max(200).optional(),
}).refine((c) => c.storage !== 's3' || !!c.s3Bucket, { path: ['s3Bucket'], message: 'must be set when GATEPOST_STORAGE is s3' });

export type Config = z.infer<typeof schema>;

const envNames: Record<keyof Config, string> = {
  nodeEnv: 'NODE_ENV',
  port: 'GATEPOST_PORT',
  host: 'GATEPOST_HOST',
  publicUrl: 'GATEPOST_PUBLIC_URL',
  databaseUrl: 'GATEPOST_DATABASE_URL',
  redisUrl: 'GATEPOST_REDIS_URL',
  dataDir: 'GATEPOST_DATA_DIR',
  jwtSecret: 'GATEPOST_JWT_SECRET',
  sessionHours: 'GATEPOST_SESSION_HOURS',
  smtpHost: 'GATEPOST_SMTP_HOST',
  smtpPort: 'GATEPOST_SMTP_PORT',
  smtpSecure: 'GATEPOST_SMTP_SECURE',
  smtpUser: 'GATEPOST_SMTP_USER',
  smtpPassword: 'GATEPOST_SMTP_PASSWORD',
  mailFrom: 'GATEPOST_MAIL_FROM',
  mailOutbox: 'GATEPOST_MAIL_OUTBOX',
  loginMaxFailures: 'GATEPOST_LOGIN_MAX_FAILURES',
  loginWindowSeconds: 'GATEPOST_LOGIN_WINDOW_SECONDS',
  loginDelayStepMs: 'GATEPOST_LOGIN_DELAY_STEP_MS',
  loginMaxDelayMs: 'GATEPOST_LOGIN_MAX_DELAY_MS',
  passwordResetMinutes: 'GATEPOST_PASSWORD_RESET_MINUTES',
  passwordResetMailsPerHour: 'GATEPOST_PASSWORD_RESET_MAILS_PER_HOUR',
  trustProxy: 'GATEPOST_TRUST_PROXY',
  logLevel: 'GATEPOST_LOG_LEVEL',
  clientDir: 'GATEPOST_CLIENT_DIR',
  storage: 'GATEPOST_STORAGE',
  s3Endpoint: 'GATEPOST_S3_ENDPOINT',
  s3Region: 'GATEPOST_S3_REGION',
  s3Bucket: 'GATEPOST_S3_BUCKET',
  s3AccessKeyId: 'GATEPOST_S3_ACCESS_KEY_ID',
  s3SecretAccessKey: 'GATEPOST_S3_SECRET_ACCESS_KEY',
  s3ForcePathStyle: 'GATEPOST_S3_FORCE_PATH_STYLE',
  uploadLimitBytes: 'GATEPOST_UPLOAD_LIMIT_BYTES',
  readUploadsFromBytes: 'GATEPOST_READ_UPLOADS_FROM_BYTES',
  uploadRequestLimitBytes: 'GATEPOST_UPLOAD_REQUEST_LIMIT_BYTES',
  maxChannelsPerCapture: 'GATEPOST_MAX_CHANNELS_PER_CAPTURE',
  maxSamplesPerChannel: 'GATEPOST_MAX_SAMPLES_PER_CHANNEL',
  labStorageQuotaBytes: 'GATEPOST_LAB_STORAGE_QUOTA_BYTES',
  jobLockMs: 'GATEPOST_JOB_LOCK_MS',
  sweepIntervalMs: 'GATEPOST_SWEEP_INTERVAL_MS',
  workerCores: 'GATEPOST_WORKER_CORES',
  workerConcurrency: 'GATEPOST_WORKER_CONCURRENCY',
  workerHost: 'GATEPOST_WORKER_HOST',
};

export class ConfigError extends Error {}

/** True for a host name or address of this machine only: localhost, 127.0.0.0/8 or ::1 (brackets allowed). */
export function isLoopbackHost(hostname: string): boolean {
  const host = hostname.replace(/^\[|\]$/g, '');
  return host === 'localhost' || host === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(host);
}

/** True for http(s) URLs of this machine only: localhost, 127.0.0.0/8 or ::1. */
export function isLoopbackUrl(url: string): boolean {
  return isLoopbackHost(new URL(url).hostname);
}

/** Reads the configuration from `env`; `overrides` (tests) win over the environment. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env, overrides: Partial<Config> = {}): Config {
  const raw: Record<string, unknown> = {};
  for (const [key, name] of Object.entries(envNames)) {
    const value = env[name];
    if (value !== undefined && value !== '') raw[key] = value;
  }
  const parsed = schema.safeParse({ ...raw, ...overrides });
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => {
      const key = String(issue.path[0]) as keyof Config;
      return `${envNames[key] ?? key}: ${issue.message}`;
    });
    throw new ConfigError(`Invalid configuration:\n  ${lines.join('\n  ')}`);
  }
  const config = parsed.data;
  if (config.jwtSecret.startsWith('development-only')) {
    // Anyone who reads this file could sign sessions with it: only a loopback-only development server may use it.
    if (config.nodeEnv === 'production') throw new ConfigError('Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set in production');
    if (!isLoopbackUrl(config.publicUrl)) {
      throw new ConfigError(`Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set when GATEPOST_PUBLIC_URL (${config.publicUrl}) is not a loopback address`);
    }
    // A loopback public URL does not make the server private: listening on 0.0.0.0 or a LAN address lets others
    // of the network send it sessions signed with the published secret.
    if (!isLoopbackHost(config.host)) {
      throw new ConfigError(`Invalid configuration:\n  GATEPOST_JWT_SECRET: must be set when GATEPOST_HOST (${config.host}) is not a loopback address`);
    }
  }
  return config;
}

/** For process entry points: the configuration, or a message naming the bad variables and exit code 2. */
export function loadConfigOrExit(): Config {
  try {
    return loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }
}
