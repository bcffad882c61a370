// The environment `npm start` (scripts/start.ts) gives its children: the API server, the worker, the mail stand-in
// and the one-shot steps. Kept apart so it can be checked without starting anything (tests/unit/scripts).

export interface StartEnvInput {
  /** The environment start.ts itself got: GATEPOST_PUBLIC_URL and any other setting the user gave pass through. */
  base: NodeJS.ProcessEnv;
  databaseUrl: string;
  redisUrl: string;
  webPort: number;
  smtpPort: number;
  /** The mail stand-in's generated password (<data>/smtp-password): it takes mail only from a client that has it. */
  smtpPassword: string;
  dataDir: string;
  jwtSecret: string;
}

/**
 * The children's environment, the loopback address the server listens on and the address people use. The public
 * address is GATEPOST_PUBLIC_URL when given (a reverse proxy's; `https://…` gives Secure cookies and HSTS), else the
 * loopback one; the server listens on 127.0.0.1 either way.
 */
export function startEnvironment(input: StartEnvInput): { env: NodeJS.ProcessEnv; localUrl: string; publicUrl: string } {
  const localUrl = `http://127.0.0.1:${input.webPort}`;
  const publicUrl = input.base.GATEPOST_PUBLIC_URL || localUrl;
  const env: NodeJS.ProcessEnv = {
    ...input.base,
    GATEPOST_DATABASE_URL: input.databaseUrl,
    GATEPOST_REDIS_URL: input.redisUrl,
    GATEPOST_PORT: String(input.webPort),
    GATEPOST_SMTP_HOST: '127.0.0.1',
    GATEPOST_SMTP_PORT: String(input.smtpPort),
    GATEPOST_SMTP_USER: 'gatepost',
    GATEPOST_SMTP_PASSWORD: input.smtpPassword,
    GATEPOST_DATA_DIR: input.dataDir,
    GATEPOST_PUBLIC_URL: publicUrl,
    GATEPOST_JWT_SECRET: input.jwtSecret,
    GATEPOST_MAIL_OUTBOX: 'fake',
    NODE_ENV: 'production',
  };
  return { env, localUrl, publicUrl };
}
