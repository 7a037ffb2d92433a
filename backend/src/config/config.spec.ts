import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  ConfigError,
  DEFAULT_STUDENT_NUMBER_PATTERN,
  loadConfig,
  studentNumberLikeWords,
} from './config';
import { readOrCreateSecret } from './secrets';

const dataDir = mkdtempSync(join(tmpdir(), 'kinpath-config-'));
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

const base = { KINPATH_DB_PASSWORD: 'x', KINPATH_DATA_DIR: dataDir };

describe('configuration', () => {
  it('applies the documented defaults', () => {
    const config = loadConfig(base);
    expect(config.host).toBe('127.0.0.1');
    expect(config.port).toBe(3000);
    expect(config.database).toMatchObject({
      host: '127.0.0.1',
      port: 54329,
      name: 'kinpath',
      user: 'kinpath',
    });
    expect(config.demo).toBe(true);
    expect(config.smtp).toEqual({ host: '127.0.0.1', port: 2525, from: 'kinpath@halden.example' });
  });

  it('refuses a missing database password and a bad port in one sentence', () => {
    expect(() => loadConfig({ KINPATH_DATA_DIR: dataDir })).toThrow(ConfigError);
    expect(() => loadConfig({ ...base, PORT: 'eighty' })).toThrow(/PORT must be a port number/);
    expect(() => loadConfig({ ...base, KINPATH_DEMO: 'maybe' })).toThrow(/'on' or 'off'/);
  });

  it('trusts no proxy unless KINPATH_TRUSTED_PROXIES names some, and refuses nonsense', () => {
    expect(loadConfig(base).trustedProxies).toEqual([]);
    expect(
      loadConfig({ ...base, KINPATH_TRUSTED_PROXIES: ' 10.0.0.5, 192.168.0.0/16,loopback ,::1' })
        .trustedProxies,
    ).toEqual(['10.0.0.5', '192.168.0.0/16', 'loopback', '::1']);
    for (const bad of ['*', 'true', '10.0.0.0/40', 'proxy.example']) {
      expect(() => loadConfig({ ...base, KINPATH_TRUSTED_PROXIES: bad })).toThrow(
        /KINPATH_TRUSTED_PROXIES must list/,
      );
    }
  });

  it('scales request limits only by a positive KINPATH_RATE_LIMIT_SCALE', () => {
    expect(loadConfig(base).rateLimitScale).toBe(1);
    expect(loadConfig({ ...base, KINPATH_RATE_LIMIT_SCALE: '100' }).rateLimitScale).toBe(100);
    expect(() => loadConfig({ ...base, KINPATH_RATE_LIMIT_SCALE: '0' })).toThrow(/above 0/);
  });

  it('finds words of the student-number form, by default the demo’s HR1000003', () => {
    const pattern = loadConfig(base).studentNumberPattern;
    expect(pattern).toBe(DEFAULT_STUDENT_NUMBER_PATTERN);
    expect(
      studentNumberLikeWords('Met HR1000003 (and hr1000051); not HR12 or xHR1000003y.', pattern),
    ).toEqual(['HR1000003', 'hr1000051']);
    // Course numbers and years are too short to be taken for one.
    expect(studentNumberLikeWords('CMP 2310 in 2026', pattern)).toEqual([]);
    const custom = loadConfig({ ...base, KINPATH_STUDENT_NUMBER_PATTERN: 's\\d{7}' });
    // Case-insensitive, like the withholding in import reports.
    expect(studentNumberLikeWords('s1234567, S1234567', custom.studentNumberPattern)).toEqual([
      's1234567',
      'S1234567',
    ]);
    expect(() => loadConfig({ ...base, KINPATH_STUDENT_NUMBER_PATTERN: '([' })).toThrow(
      /KINPATH_STUDENT_NUMBER_PATTERN must be a regular expression/,
    );
    expect(() => loadConfig({ ...base, KINPATH_STUDENT_NUMBER_PATTERN: '\\d*' })).toThrow(
      /must not match empty text/,
    );
  });

  it('reads KINPATH_DEMO=off', () => {
    expect(loadConfig({ ...base, KINPATH_DEMO: 'off' }).demo).toBe(false);
  });

  it('creates a secret once, readable by the owner only', () => {
    const first = readOrCreateSecret(dataDir, 'jwt-secret');
    expect(first.length).toBeGreaterThanOrEqual(32);
    expect(readOrCreateSecret(dataDir, 'jwt-secret')).toBe(first);
    expect(statSync(join(dataDir, 'jwt-secret')).mode & 0o777).toBe(0o600);
  });
});
