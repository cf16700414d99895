import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type express from 'express';
import expressStaticGzip from 'express-static-gzip';

/**
 * The Cache-Control header of a built client file: hashed assets for a year and `immutable`, everything
 * else (the HTML shell, the service worker, the manifest, the icon) revalidated on every use.
 * @example cacheControlOf('assets/index-CbDF-tyC.js') // 'public, max-age=31536000, immutable'
 */
export function cacheControlOf(relativePath: string): string {
  // Vite puts every content-hashed file under `assets/`: a new build gives it a new name, so it never changes.
  return relativePath.split(path.sep).join('/').startsWith('assets/')
    ? 'public, max-age=31536000, immutable'
    : 'no-cache';
}

/** The built client's files from `distDir`: the brotli or gzip copy the build made when the browser accepts it. */
function clientFiles(distDir: string): express.RequestHandler {
  return expressStaticGzip(distDir, {
    enableBrotli: true,
    orderPreference: ['br', 'gz'],
    index: false,
    serveStatic: {
      cacheControl: false,
      // A hashed file never changes; the rest revalidates by its ETag.
      lastModified: false,
      setHeaders: (res, filePath) => {
        res.setHeader('Cache-Control', cacheControlOf(path.relative(distDir, filePath)));
      },
    },
  });
}

/**
 * The client's content-hashed files under `/assets`, to mount before the security headers: a page's
 * policy headers mean nothing on a script, a stylesheet or a font, and on a phone's slow link their
 * kilobyte on each of some twenty files costs more than several of the files. The headers that do
 * apply to such a file are kept. A missing file is a 404, never the HTML shell.
 */
export function hashedAssets(distDir: string): express.RequestHandler {
  const files = clientFiles(distDir);
  return (req, res, next) => {
    if (!req.path.startsWith('/assets/')) return next();
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Cross-Origin-Resource-Policy', 'same-origin');
    files(req, res, () => res.status(404).end());
  };
}

/**
 * The phone routes' own HTML shells (written by the build's `routeShells` in vite.config.ts): the shell
 * with the phone's part of the stylesheet written into it. `/phone/<session>/my-data` and every other path get index.html.
 */
export const ROUTE_SHELLS: readonly { path: RegExp; file: string }[] = [
  { path: /^\/join(?:\/[^/]+)?\/?$/, file: 'route-shells/join.html' },
  { path: /^\/phone\/[^/]+\/?$/, file: 'route-shells/phone.html' },
];

/**
 * The HTML shell for a path: a phone route's own shell when the build wrote it, else index.html.
 * @example shellFor('/phone/3f2a…', ['route-shells/phone.html']) // '/route-shells/phone.html'
 */
export function shellFor(pathname: string, built: readonly string[]): string {
  const shell = ROUTE_SHELLS.find((s) => s.path.test(pathname) && built.includes(s.file));
  return `/${shell?.file ?? 'index.html'}`;
}

/**
 * Serves the rest of the built client from `distDir` with {@link cacheControlOf}'s caching, and the
 * HTML shell for every other path outside `/api`, `/socket.io` and `/assets` (the router is the client's).
 */
export function serveClient(app: express.Express, distDir: string): void {
  const files = clientFiles(distDir);
  const built = ROUTE_SHELLS.map((s) => s.file).filter((f) => fs.existsSync(path.join(distDir, f)));
  app.use(files);
  // A missing hashed file stays a 404: answering it with the shell would hand a page HTML for a script.
  app.get(/^\/(?!api\/|socket\.io\/|assets\/).*/, (req, res, next) => {
    // The shell goes through the same middleware, so it too is sent pre-compressed.
    req.url = shellFor(req.path, built);
    files(req, res, next);
  });
}

/**
 * The Content-Security-Policy sources of the inline scripts in the built HTML shells (index.html and the
 * route shells): each script's SHA-256, so the policy allows exactly those scripts and no other inline one.
 * Today there is one, the phone's first-screen painter (`firstScreenScript` in vite.config.ts).
 * @example inlineScriptSources('<script>paint()</script>') // ["'sha256-…'"]
 */
export function inlineScriptSources(...htmls: string[]): string[] {
  const sources = new Set<string>();
  for (const html of htmls) {
    for (const match of html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)) {
      if (/\ssrc\s*=/i.test(match[1]!) || !match[2]) continue;
      sources.add(`'sha256-${crypto.createHash('sha256').update(match[2], 'utf8').digest('base64')}'`);
    }
  }
  return [...sources];
}

/** {@link inlineScriptSources} of the HTML shells the build wrote in `distDir` (none without a build). */
export function builtInlineScriptSources(distDir: string): string[] {
  const shells = ['index.html', ...ROUTE_SHELLS.map((s) => s.file)].map((f) => path.join(distDir, f)).filter((f) => fs.existsSync(f));
  return inlineScriptSources(...shells.map((f) => fs.readFileSync(f, 'utf8')));
}
