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

/**
 * Serves the built client from `distDir`: the brotli or gzip copy the build made when the browser accepts
 * it, with {@link cacheControlOf}'s caching, and the HTML shell for every other path outside `/api` and
 * `/socket.io` and `assets/` (the router is the client's).
 */
export function serveClient(app: express.Express, distDir: string): void {
  const files = expressStaticGzip(distDir, {
    enableBrotli: true,
    orderPreference: ['br', 'gz'],
    index: false,
    serveStatic: {
      cacheControl: false,
      setHeaders: (res, filePath) => {
        res.setHeader('Cache-Control', cacheControlOf(path.relative(distDir, filePath)));
      },
    },
  });
  app.use(files);
  // A missing hashed file stays a 404: answering it with the shell would hand a page HTML for a script.
  app.get(/^\/(?!api\/|socket\.io\/|assets\/).*/, (req, res, next) => {
    // The shell goes through the same middleware, so it too is sent pre-compressed.
    req.url = '/index.html';
    files(req, res, next);
  });
}
