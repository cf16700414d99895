import { afterEach, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadConfig } from '../../server/config/env';
import { TEST_SECRET } from './helpers';

const dirs: string[] = [];
function tempDir(): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cairn-config-'));
  dirs.push(dir);
  return dir;
}
afterEach(() => {
  for (const dir of dirs.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
});

describe('loadConfig', () => {
  it('fills in the defaults', () => {
    // A JWT_SECRET keeps loadConfig from writing a dev secret into ./data.
    const c = loadConfig({ JWT_SECRET: TEST_SECRET });
    expect(c).toMatchObject({
      nodeEnv: 'development',
      port: 3000,
      host: '0.0.0.0',
      dataDir: path.resolve('data'),
      databasePath: path.resolve('data', 'cairn.sqlite'),
      uploadDir: path.resolve('data', 'uploads'),
      allowSignup: false,
      publicUrl: null,
      smtpUrl: null,
      seedDemo: true,
      logLevel: 'info',
      accessTokenTtlSec: 900,
      corsOrigins: [],
      joinsPerCode: 2000,
    });
  });

  it('keeps the database under DATA_DIR unless DATABASE_PATH says otherwise', () => {
    const dir = tempDir();
    expect(loadConfig({ DATA_DIR: dir, JWT_SECRET: TEST_SECRET }).databasePath).toBe(path.join(dir, 'cairn.sqlite'));
    const elsewhere = path.join(dir, 'elsewhere', 'cairn.db');
    expect(loadConfig({ DATA_DIR: dir, DATABASE_PATH: elsewhere, JWT_SECRET: TEST_SECRET }).databasePath).toBe(elsewhere);
  });

  it('reads the values it is given', () => {
    const c = loadConfig({
      JWT_SECRET: TEST_SECRET,
      PORT: '4000',
      ALLOW_SIGNUP: 'yes',
      SEED_DEMO: '0',
      PUBLIC_URL: 'https://cairn.harbourlane.example',
      CORS_ORIGINS: ' http://a.example ,, http://b.example ',
    });
    expect(c).toMatchObject({
      port: 4000,
      allowSignup: true,
      seedDemo: false,
      publicUrl: 'https://cairn.harbourlane.example',
      corsOrigins: ['http://a.example', 'http://b.example'],
    });
  });

  it.each(['abc', '70000', '-1', '3.5'])('refuses PORT=%s with a readable message naming PORT', (port) => {
    expect(() => loadConfig({ PORT: port, JWT_SECRET: TEST_SECRET })).toThrow(/^Cairn cannot start: the environment is not valid\n {2}PORT: /);
  });

  // An empty PORT (`PORT=` in an .env file) must not coerce to 0, a random port.
  it('does not turn an empty PORT into port 0', () => {
    let port: number | undefined;
    try {
      port = loadConfig({ PORT: '', JWT_SECRET: TEST_SECRET }).port;
    } catch {
      return;
    }
    expect(port).toBe(3000);
  });

  it('refuses a short JWT_SECRET and other bad values, listing each', () => {
    let message = '';
    try {
      loadConfig({ JWT_SECRET: 'too short', LOG_LEVEL: 'chatty', ALLOW_SIGNUP: 'maybe' });
    } catch (err) {
      message = (err as Error).message;
    }
    expect(message).toContain('JWT_SECRET: JWT_SECRET must be at least 32 characters');
    expect(message).toMatch(/\n {2}LOG_LEVEL: /);
    expect(message).toMatch(/\n {2}ALLOW_SIGNUP: /);
  });

  it('generates the dev JWT secret once and keeps it in the data folder', () => {
    const dir = path.join(tempDir(), 'not-yet-there');
    const first = loadConfig({ DATA_DIR: dir });
    const second = loadConfig({ DATA_DIR: dir });
    expect(first.jwtSecret.length).toBeGreaterThanOrEqual(32);
    expect(second.jwtSecret).toBe(first.jwtSecret);
    const file = path.join(dir, 'jwt-secret');
    expect(fs.readFileSync(file, 'utf8').trim()).toBe(first.jwtSecret);
    if (process.platform !== 'win32') expect(fs.statSync(file).mode & 0o777).toBe(0o600);
    expect(loadConfig({ DATA_DIR: tempDir() }).jwtSecret).not.toBe(first.jwtSecret);
  });

  it('prefers JWT_SECRET and then writes no secret file', () => {
    const dir = tempDir();
    expect(loadConfig({ DATA_DIR: dir, JWT_SECRET: TEST_SECRET }).jwtSecret).toBe(TEST_SECRET);
    expect(fs.existsSync(path.join(dir, 'jwt-secret'))).toBe(false);
  });
});
