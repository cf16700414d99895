/**
 * `npm test`: runs every Cairn test (Vitest: shared computations, API and sockets; then the client
 * build and Playwright in Debian's Chromium) and ends with one line `N passed, N failed`.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';

const OUT = '.test-output';
fs.mkdirSync(OUT, { recursive: true });

function run(cmd: string, args: string[], env: Record<string, string> = {}): number {
  const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } });
  return r.status ?? 1;
}

function readJson<T>(file: string): T | null {
  try {
    return JSON.parse(fs.readFileSync(file, 'utf8')) as T;
  } catch {
    return null;
  }
}

let passed = 0;
let failed = 0;
let skipped = 0;

// 1. Vitest
fs.rmSync(`${OUT}/vitest.json`, { force: true });
const vitestCode = run('npx', ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${OUT}/vitest.json`]);
const v = readJson<{ numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number }>(`${OUT}/vitest.json`);
if (v) {
  passed += v.numPassedTests;
  failed += v.numFailedTests;
  skipped += v.numPendingTests + v.numTodoTests;
}
if (!v || (vitestCode !== 0 && v.numFailedTests === 0)) failed += 1; // the run itself broke (e.g. a file failed to load)

// 2. Browser tests against the built app
const onlyUnit = process.argv.includes('--unit');
if (!onlyUnit) {
  const buildCode = run('npx', ['vite', 'build', '--logLevel', 'warn']);
  if (buildCode !== 0) {
    failed += 1;
  } else {
    fs.rmSync(`${OUT}/playwright.json`, { force: true });
    const pwCode = run('npx', ['playwright', 'test']);
    const p = readJson<{ stats: { expected: number; unexpected: number; flaky: number; skipped: number } }>(`${OUT}/playwright.json`);
    if (p) {
      passed += p.stats.expected + p.stats.flaky;
      failed += p.stats.unexpected;
      skipped += p.stats.skipped;
    }
    if (!p || (pwCode !== 0 && p.stats.unexpected === 0)) failed += 1;
  }
}

console.log('');
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 ? 1 : 0);
