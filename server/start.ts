import fs from 'node:fs';
import path from 'node:path';

/** Newest modification time of the files under the given paths (recursively). */
function newest(paths: string[]): number {
  let max = 0;
  const walk = (p: string) => {
    if (!fs.existsSync(p)) return;
    const st = fs.statSync(p);
    if (st.isDirectory()) for (const f of fs.readdirSync(p)) walk(path.join(p, f));
    else max = Math.max(max, st.mtimeMs);
  };
  paths.forEach(walk);
  return max;
}

// `npm start`: build the client when dist/ is missing or older than its sources, then serve.
const root = path.resolve(import.meta.dirname, '..');
const built = path.join(root, 'dist', 'index.html');
const sources = ['src', 'shared', 'index.html', 'vite.config.ts', 'package.json'].map((p) => path.join(root, p));
if (!fs.existsSync(built) || fs.statSync(built).mtimeMs < newest(sources)) {
  console.log('Building the Cairn client…');
  const { build } = await import('vite');
  await build({ root, logLevel: 'warn', configFile: path.join(root, 'vite.config.ts') });
}
await import('./index');
