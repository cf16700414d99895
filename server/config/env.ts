import { z } from 'zod';
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';

// An empty variable counts as not set (so `PORT=` means the default, not port 0).
const unsetIfEmpty = (v: unknown) => (v === '' ? undefined : v);
const port = (fallback: number) => z.preprocess(unsetIfEmpty, z.coerce.number().int().min(0).max(65535).default(fallback));

const bool = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

/** The environment variables Cairn reads, with their defaults. */
export const EnvSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: port(3000),
  HOST: z.string().default('0.0.0.0'),
  DATA_DIR: z.string().default('data'),
  DATABASE_PATH: z.string().optional(),
  JWT_SECRET: z.string().min(32, 'JWT_SECRET must be at least 32 characters').optional(),
  ALLOW_SIGNUP: bool.default(false),
  PUBLIC_URL: z.url().optional(),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default('Cairn <cairn@cairn.localhost>'),
  DEV_SMTP_PORT: port(0),
  SEED_DEMO: bool.default(true),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  ACCESS_TOKEN_TTL_SEC: z.coerce.number().int().min(10).max(86400).default(900),
  CORS_ORIGINS: z.string().default(''),
  REDIS_URL: z.string().optional(),
  SIGN_IN_ATTEMPTS: z.preprocess(unsetIfEmpty, z.coerce.number().int().min(1).max(10_000).optional()),
  JOINS_PER_CODE: z.preprocess(unsetIfEmpty, z.coerce.number().int().min(10).max(1_000_000).default(2_000)),
});

/** Cairn's validated configuration. */
export interface Config {
  nodeEnv: 'development' | 'production' | 'test';
  port: number;
  host: string;
  dataDir: string;
  databasePath: string;
  uploadDir: string;
  jwtSecret: string;
  allowSignup: boolean;
  publicUrl: string | null;
  smtpUrl: string | null;
  mailFrom: string;
  devSmtpPort: number;
  seedDemo: boolean;
  logLevel: z.infer<typeof EnvSchema>['LOG_LEVEL'];
  accessTokenTtlSec: number;
  /** Extra origins allowed to open sockets (besides the page's own). */
  corsOrigins: string[];
  /** Redis for sharing socket broadcasts between several Cairn processes; `null` for one process. */
  redisUrl: string | null;
  /** Sign-in and reset attempts one network address may make for one e-mail per 10 minutes (three times as many failures per account). */
  signInAttempts: number;
  /** Joins one join code takes per 10 minutes (a room and its rejoins; more for a large event). */
  joinsPerCode: number;
}

/** Reads the dev signing secret from the data folder, creating it on first use. */
function persistedSecret(dataDir: string): string {
  const file = path.join(dataDir, 'jwt-secret');
  if (fs.existsSync(file)) return fs.readFileSync(file, 'utf8').trim();
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  const secret = crypto.randomBytes(48).toString('base64url');
  fs.writeFileSync(file, secret, { mode: 0o600 });
  return secret;
}

/**
 * Parses the environment into a Config, failing fast with a readable message.
 * @example loadConfig({ PORT: '4000', DATA_DIR: '/tmp/cairn' })
 */
export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
  const parsed = EnvSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
    throw new Error(`Cairn cannot start: the environment is not valid\n${lines}`);
  }
  const e = parsed.data;
  const dataDir = path.resolve(e.DATA_DIR);
  return {
    nodeEnv: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    dataDir,
    databasePath: path.resolve(e.DATABASE_PATH ?? path.join(dataDir, 'cairn.sqlite')),
    uploadDir: path.join(dataDir, 'uploads'),
    jwtSecret: e.JWT_SECRET ?? persistedSecret(dataDir),
    allowSignup: e.ALLOW_SIGNUP,
    publicUrl: e.PUBLIC_URL ?? null,
    smtpUrl: e.SMTP_URL ?? null,
    mailFrom: e.MAIL_FROM,
    devSmtpPort: e.DEV_SMTP_PORT,
    seedDemo: e.SEED_DEMO,
    logLevel: e.LOG_LEVEL,
    accessTokenTtlSec: e.ACCESS_TOKEN_TTL_SEC,
    corsOrigins: e.CORS_ORIGINS.split(',').map((s) => s.trim()).filter(Boolean),
    redisUrl: e.REDIS_URL ?? null,
    joinsPerCode: e.JOINS_PER_CODE,
    signInAttempts: e.SIGN_IN_ATTEMPTS ?? (e.NODE_ENV === 'production' ? 10 : 50),
  };
}
