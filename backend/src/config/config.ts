import { mkdirSync } from 'node:fs';
import { isIP } from 'node:net';
import { isAbsolute, resolve } from 'node:path';

/** The repository root, found from this file in both `src/config` and `dist/config`. */
export const REPO_ROOT = resolve(__dirname, '..', '..', '..');

export type LogLevel = 'error' | 'warn' | 'log' | 'debug' | 'verbose';

export interface DatabaseConfig {
  host: string;
  port: number;
  name: string;
  user: string;
  password: string;
}

export interface AppConfig {
  host: string;
  port: number;
  database: DatabaseConfig;
  dataDir: string;
  /** Undefined when the secret is to be read from or generated into the data folder. */
  jwtSecret: string | undefined;
  /** Undefined when the demo key of the data folder is to be used. */
  pseudonymKey: string | undefined;
  demo: boolean;
  demoDir: string;
  adminEmail: string | undefined;
  adminPassword: string | undefined;
  smtp: { host: string; port: number; from: string };
  staticDir: string;
  logLevel: LogLevel;
  /** JSON lines (the default, for log collectors) or plain text for a person at a terminal. */
  logFormat: 'json' | 'text';
  /** Where people reach Kinpath: the links in invitation and reset e-mails start with it. */
  publicUrl: string;
  /** Origins allowed to call the API from another site; none by default (same origin only). */
  corsOrigins: string[];
  /**
   * Proxies whose X-Forwarded-For is believed (addresses, CIDR ranges, or Express's names
   * loopback, linklocal, uniquelocal); none by default, so a client cannot pick its address.
   */
  trustedProxies: string[];
  /**
   * What a student number looks like (a regular expression, matched as a whole word): free
   * text (notes, summary messages) and file names are checked against it.
   */
  studentNumberPattern: string;
  /** Multiplies every route's request limit (RATE_LIMITS); 1 in real use. */
  rateLimitScale: number;
}

type Env = Record<string, string | undefined>;

/** A setting that cannot be used; its message is one sentence naming the variable. */
export class ConfigError extends Error {
  override name = 'ConfigError';
}

function text(env: Env, name: string, fallback?: string): string | undefined {
  const value = env[name]?.trim();
  return value ? value : fallback;
}

function required(env: Env, name: string, why: string): string {
  const value = text(env, name);
  if (!value) throw new ConfigError(`${name} is not set: ${why}.`);
  return value;
}

function port(env: Env, name: string, fallback: number): number {
  const raw = text(env, name);
  if (raw === undefined) return fallback;
  const value = Number(raw);
  if (!/^\d+$/.test(raw) || value < 1 || value > 65535) {
    throw new ConfigError(`${name} must be a port number from 1 to 65535, not '${raw}'.`);
  }
  return value;
}

function folder(env: Env, name: string, fallback: string): string {
  const value = text(env, name, fallback) as string;
  return isAbsolute(value) ? value : resolve(process.cwd(), value);
}

function onOff(env: Env, name: string, fallback: boolean): boolean {
  const raw = text(env, name)?.toLowerCase();
  if (raw === undefined) return fallback;
  if (['on', 'true', '1', 'yes'].includes(raw)) return true;
  if (['off', 'false', '0', 'no'].includes(raw)) return false;
  throw new ConfigError(`${name} must be 'on' or 'off', not '${raw}'.`);
}

const LOG_LEVELS: Record<string, LogLevel> = {
  error: 'error',
  warn: 'warn',
  warning: 'warn',
  log: 'log',
  info: 'log',
  debug: 'debug',
  verbose: 'verbose',
  trace: 'verbose',
};

/** Only what the database needs, so the migration CLI runs without the rest of the settings. */
export function loadDatabaseConfig(env: Env = process.env): DatabaseConfig {
  return {
    host: text(env, 'KINPATH_DB_HOST', '127.0.0.1') as string,
    port: port(env, 'KINPATH_DB_PORT', 54329),
    name: text(env, 'KINPATH_DB_NAME', 'kinpath') as string,
    user: text(env, 'KINPATH_DB_USER', 'kinpath') as string,
    password: required(env, 'KINPATH_DB_PASSWORD', 'set it to the password of the database user'),
  };
}

export function loadConfig(env: Env = process.env): AppConfig {
  const rawLevel = text(env, 'KINPATH_LOG_LEVEL', 'log') as string;
  const logLevel = LOG_LEVELS[rawLevel.toLowerCase()];
  if (!logLevel) {
    throw new ConfigError(
      `KINPATH_LOG_LEVEL must be one of error, warn, log, debug or verbose, not '${rawLevel}'.`,
    );
  }
  const jwtSecret = text(env, 'KINPATH_JWT_SECRET');
  if (jwtSecret !== undefined && jwtSecret.length < 32) {
    throw new ConfigError('KINPATH_JWT_SECRET must be at least 32 characters long.');
  }
  const pseudonymKey = text(env, 'KINPATH_PSEUDONYM_KEY');
  if (pseudonymKey !== undefined && pseudonymKey.length < 16) {
    throw new ConfigError('KINPATH_PSEUDONYM_KEY must be at least 16 characters long.');
  }
  const dataDir = folder(env, 'KINPATH_DATA_DIR', resolve(REPO_ROOT, '.data', 'start'));
  try {
    mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  } catch {
    throw new ConfigError(`KINPATH_DATA_DIR (${dataDir}) cannot be created or written.`);
  }
  const host = text(env, 'HOST', '127.0.0.1') as string;
  const listenPort = port(env, 'PORT', 3000);
  const publicUrl = (
    text(env, 'KINPATH_PUBLIC_URL') ??
    `http://${host.includes(':') ? `[${host}]` : host}:${listenPort}`
  ).replace(/\/+$/, '');
  if (!/^https?:\/\/[^\s/]+/.test(publicUrl)) {
    throw new ConfigError(`KINPATH_PUBLIC_URL must be an http(s) address, not '${publicUrl}'.`);
  }
  const corsOrigins = (text(env, 'KINPATH_CORS_ORIGINS') ?? '')
    .split(',')
    .map((origin) => origin.trim())
    .filter(Boolean);
  return {
    host,
    port: listenPort,
    database: loadDatabaseConfig(env),
    dataDir,
    jwtSecret,
    pseudonymKey,
    demo: onOff(env, 'KINPATH_DEMO', true),
    demoDir: folder(env, 'KINPATH_DEMO_DIR', resolve(REPO_ROOT, '.data', 'demo')),
    adminEmail: text(env, 'KINPATH_ADMIN_EMAIL')?.toLowerCase(),
    adminPassword: env.KINPATH_ADMIN_PASSWORD || undefined,
    smtp: {
      host: text(env, 'KINPATH_SMTP_HOST', '127.0.0.1') as string,
      port: port(env, 'KINPATH_SMTP_PORT', 2525),
      from: text(env, 'KINPATH_MAIL_FROM', 'kinpath@halden.example') as string,
    },
    staticDir: folder(env, 'KINPATH_STATIC_DIR', resolve(REPO_ROOT, 'frontend', 'dist')),
    logLevel,
    logFormat: logFormat(env),
    publicUrl,
    corsOrigins,
    trustedProxies: trustedProxies(env),
    studentNumberPattern: studentNumberPattern(env),
    rateLimitScale: positiveNumber(env, 'KINPATH_RATE_LIMIT_SCALE', 1),
  };
}

/**
 * Up to four letters, then 6 to 12 digits: the demo's HR1000003 and most registrars' forms.
 * Six digits at least, so that course numbers (CMP 2310) and years are never taken for one.
 */
export const DEFAULT_STUDENT_NUMBER_PATTERN = '[A-Za-z]{0,4}[0-9]{6,12}';

function studentNumberPattern(env: Env): string {
  const source = text(
    env,
    'KINPATH_STUDENT_NUMBER_PATTERN',
    DEFAULT_STUDENT_NUMBER_PATTERN,
  ) as string;
  try {
    new RegExp(source, 'u');
  } catch {
    throw new ConfigError(
      `KINPATH_STUDENT_NUMBER_PATTERN must be a regular expression, such as ${DEFAULT_STUDENT_NUMBER_PATTERN}; '${source}' is not one.`,
    );
  }
  if (new RegExp(`^(?:${source})$`, 'u').test('')) {
    throw new ConfigError('KINPATH_STUDENT_NUMBER_PATTERN must not match empty text.');
  }
  return source;
}

const finders = new Map<string, RegExp>();

/**
 * The pattern as a global, case-insensitive search for whole words (not inside a longer run
 * of letters or digits); one per pattern, shared by every caller.
 */
export function studentNumberFinder(pattern: string): RegExp {
  let finder = finders.get(pattern);
  if (!finder) {
    finder = new RegExp(`(?<![\\p{L}\\p{N}])(?:${pattern})(?![\\p{L}\\p{N}])`, 'giu');
    finders.set(pattern, finder);
  }
  return finder;
}

/** Every whole word of `text` that has the form of a student number. */
export function studentNumberLikeWords(text: string, pattern: string): string[] {
  return [...new Set(text.match(studentNumberFinder(pattern)) ?? [])];
}

const PROXY_NAMES = new Set(['loopback', 'linklocal', 'uniquelocal']);

function trustedProxies(env: Env): string[] {
  const entries = (text(env, 'KINPATH_TRUSTED_PROXIES') ?? '')
    .split(',')
    .map((entry) => entry.trim())
    .filter(Boolean);
  for (const entry of entries) {
    const [address, bits, extra] = entry.split('/');
    const family = isIP(address);
    const okBits =
      bits === undefined ||
      (/^\d+$/.test(bits) && Number(bits) <= (family === 6 ? 128 : 32) && extra === undefined);
    if (!(PROXY_NAMES.has(entry) || (family !== 0 && okBits))) {
      throw new ConfigError(
        `KINPATH_TRUSTED_PROXIES must list addresses, CIDR ranges or loopback, linklocal, uniquelocal, separated by commas; '${entry}' is none of these.`,
      );
    }
  }
  return entries;
}

function positiveNumber(env: Env, name: string, fallback: number): number {
  const raw = text(env, name);
  if (raw === undefined) return fallback;
  const value = Number(raw);
  if (!Number.isFinite(value) || value <= 0) {
    throw new ConfigError(`${name} must be a number above 0, not '${raw}'.`);
  }
  return value;
}

function logFormat(env: Env): 'json' | 'text' {
  const raw = (text(env, 'KINPATH_LOG_FORMAT', 'json') as string).toLowerCase();
  if (raw !== 'json' && raw !== 'text') {
    throw new ConfigError(`KINPATH_LOG_FORMAT must be 'json' or 'text', not '${raw}'.`);
  }
  return raw;
}

/** Nest's logger shows the chosen level and every more severe one. */
export function logLevelsFrom(level: LogLevel): LogLevel[] {
  const order: LogLevel[] = ['error', 'warn', 'log', 'debug', 'verbose'];
  return order.slice(0, order.indexOf(level) + 1);
}
