import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { compression } from 'vite-plugin-compression2';
import { VitePWA } from 'vite-plugin-pwa';
import { baseCompile } from '@intlify/message-compiler';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { build, type Plugin } from 'vite';
import { LIGHT, cssVariables } from './src/theme/palette';
import { phoneStylesheet } from './build/phone-stylesheet';
import { phoneChunks } from './build/phone-chunks';
import { ROUTE_SHELLS } from './server/common/client-assets';
import { WHOLE_STYLESHEET_LATER } from './src/theme/whole-stylesheet';
import { LOCALES } from './shared/locales';
import { PRELOAD_AFTER_PAINT, joinWordsOf } from './src/boot/join-screen';

/**
 * Preloads the built font file whose name matches `match` from the HTML shell: the browser otherwise finds
 * it only once the stylesheet has arrived and been read, a round trip later on a phone's slow link.
 */
function preloadFont(match: RegExp): Plugin {
  return {
    name: 'cairn-preload-font',
    apply: 'build',
    transformIndexHtml: {
      order: 'post',
      handler(_html, ctx) {
        const file = Object.keys(ctx.bundle ?? {}).find((f) => match.test(f));
        // `crossorigin`: fonts are fetched in CORS mode, and a preload only serves a request of the same mode.
        return file ? [{ tag: 'link', attrs: { rel: 'preload', as: 'font', type: 'font/woff2', href: `/${file}`, crossorigin: '' }, injectTo: 'head' }] : [];
      },
    },
  };
}

/**
 * Fills the HTML shell's colours (`%cairn-primary%`, …) from the palette: the shell paints before any
 * script runs, so it cannot read the CSS variables the app writes at start-up.
 */
function paletteInHtml(): Plugin {
  const vars = cssVariables();
  return {
    name: 'cairn-palette-in-html',
    transformIndexHtml: (html) =>
      html.replace(/%cairn-([a-z-]+)%/g, (token, name: string) => {
        const colour = vars[`--cairn-${name}`];
        if (!colour) throw new Error(`index.html names ${token}, which is not in src/theme/palette.ts`);
        return colour;
      }),
  };
}

/** The phone routes' pages, as the bundler names their modules. */
const JOIN_PAGE = '/src/pages/join.vue';
const PHONE_PAGE = '/src/pages/phone.vue';

/** The chunk a page's module is in: the chunk it is the face of, else the one it was grouped into (build/phone-chunks.ts). */
function chunkHolding<C extends { facadeModuleId: string | null; moduleIds: string[] }>(chunks: C[], page: string): C | undefined {
  return chunks.find((c) => c.facadeModuleId?.endsWith(page)) ?? chunks.find((c) => c.moduleIds.some((id) => id.endsWith(page)));
}

/**
 * Writes an HTML shell of its own for each phone route (`route-shells/<name>.html`), which the server sends
 * for the routes' paths (server/common/client-assets.ts); every other path gets index.html.
 *
 * The shells carry the phone's stylesheet in place of the whole one: the whole stylesheet (the component
 * library's, the fonts', Cairn's own) cut to the rules that the scripts a phone's routes can load could use
 * (build/phone-stylesheet.ts), written into the shell itself so that nothing blocks the first paint but the
 * HTML. The whole stylesheet's link stays, with a type no browser loads (`data-cairn-whole`); the router takes the
 * type away before any screen that is not a phone's (src/theme/whole-stylesheet.ts).
 *
 * Their heads preload nothing beyond the font: both routes' shells paint their first screen themselves
 * (src/boot/first-screen.ts, src/boot/join-screen.ts), and measured with Lighthouse's mobile preset
 * (docs/benchmark.md), `modulepreload` links started before that paint delayed the simulated first paint (the
 * welcome item 0.91 → 0.97 without them; on `/join` FCP 2.3 → 1.4–1.5 s). A route named in `preloadAfterPaint`
 * (the join page) lists its page's files in a `<meta>` instead, which the shell's script asks for once it has
 * painted: without them the join page mounted about 0.6 s later on a phone's link.
 */
function routeShells(pages: Record<string, string>, otherPhonePages: string[], preloadAfterPaint: string[] = []): Plugin {
  return {
    name: 'cairn-route-shells',
    apply: 'build',
    generateBundle: {
      // After Vite has put index.html in the bundle.
      order: 'post',
      async handler(_options, bundle) {
        const html = bundle['index.html'];
        const chunks = Object.values(bundle).flatMap((c) => (c.type === 'chunk' ? [c] : []));
        const entry = chunks.find((c) => c.isEntry);
        if (html?.type !== 'asset' || !entry) return this.error('cairn-route-shells: no index.html or entry chunk in the bundle');
        const chunkOf = (page: string) => chunkHolding(chunks, page);
        const inEntry = new Set([entry.fileName, ...entry.imports]);

        // Every script a phone's routes can run: the first script and what it imports, and each phone page with
        // everything it imports, now or later (each activity's input).
        const phoneCode = new Set(inEntry);
        const reach = (file: string): void => {
          const c = bundle[file];
          if (phoneCode.has(file) || c?.type !== 'chunk') return;
          phoneCode.add(file);
          [...c.imports, ...c.dynamicImports].forEach(reach);
        };
        for (const page of [...Object.values(pages), ...otherPhonePages]) {
          const chunk = chunkOf(page);
          if (!chunk) return this.error(`cairn-route-shells: no chunk for ${page}`);
          reach(chunk.fileName);
        }
        const wholeCss = [...(entry.viteMetadata?.importedCss ?? [])];
        const wholeLink = new RegExp(`<link rel="stylesheet" crossorigin href="/${wholeCss[0]?.replace(/[.]/g, '[.]')}">`);
        const whole = wholeCss.length === 1 ? bundle[wholeCss[0]!] : undefined;
        if (whole?.type !== 'asset' || !wholeLink.test(String(html.source))) {
          return this.error('cairn-route-shells: expected one stylesheet for the first script, linked from index.html');
        }
        const phoneCss = await phoneStylesheet(
          String(whole.source),
          [...phoneCode].map((f) => (bundle[f] as { code: string }).code),
        );
        // `</style` cannot occur in a stylesheet's rules; checked so that the shell's markup stays whole.
        if (/<\/style/i.test(phoneCss)) return this.error('cairn-route-shells: the phone stylesheet holds "</style"');
        // The whole stylesheet's link stays where it was, typed as no stylesheet language a browser knows: a browser
        // fetches no such stylesheet (a `disabled` one is fetched all the same by some Chromium versions' preload
        // scanner), while Vite's loader of lazy files, which looks only at `rel` and `href`, finds it and does not add
        // it either. src/theme/whole-stylesheet.ts takes the type away where it stands, keeping the cascade as in index.html.
        const phoneStyle = `<style data-cairn-phone>${phoneCss}</style>\n    <link rel="stylesheet" crossorigin href="/${whole.fileName}" type="${WHOLE_STYLESHEET_LATER}" data-cairn-whole>`;

        for (const [name, page] of Object.entries(pages)) {
          // The files of a route's page beyond the first script, which the shell's script asks for once it has painted.
          const files = new Set<string>();
          const walk = (file: string): void => {
            const c = bundle[file];
            if (inEntry.has(file) || files.has(file) || c?.type !== 'chunk') return;
            files.add(file);
            c.imports.forEach(walk);
          };
          if (preloadAfterPaint.includes(name)) walk(chunkOf(page)!.fileName);
          const later = files.size ? `\n    <meta name="${PRELOAD_AFTER_PAINT}" content="${[...files].map((f) => `/${f}`).join(' ')}">` : '';
          const source = String(html.source)
            .replace(wholeLink, () => phoneStyle)
            .replace('</title>', () => `</title>${later}`);
          this.emitFile({ type: 'asset', fileName: `route-shells/${name}.html`, source });
        }
      },
    },
    // The compression plugin has read the bundle before these were added: their brotli and gzip copies are made here.
    writeBundle(options, bundle) {
      for (const file of Object.keys(bundle).filter((f) => f.startsWith('route-shells/'))) {
        const full = path.join(options.dir!, file);
        const text = fs.readFileSync(full);
        fs.writeFileSync(`${full}.br`, zlib.brotliCompressSync(text));
        fs.writeFileSync(`${full}.gz`, zlib.gzipSync(text, { level: 9 }));
      }
    },
  };
}

/**
 * The service worker's way with a phone route's page (`/join…`, `/phone/<session>`): the route's own shell
 * from its precache, as the server would send it (with the phone's stylesheet, which index.html does not
 * carry), or from the network while it is not cached. Workbox writes a route's `urlPattern` and `handler`
 * into the service worker as their source text, so the server's table of shells goes in as literals.
 */
const shellTable = `[${ROUTE_SHELLS.map((s) => `[${String(s.path)}, ${JSON.stringify(`/${s.file}`)}]`).join(', ')}]`;
const phoneShellRoute = {
  urlPattern: new Function(
    '{ request, url, sameOrigin }',
    `return sameOrigin && request.mode === 'navigate' && ${shellTable}.some(([path]) => path.test(url.pathname));`,
  ) as (options: { request: Request; url: URL; sameOrigin: boolean }) => boolean,
  handler: new Function(
    '{ request, url }',
    `const shell = ${shellTable}.find(([path]) => path.test(url.pathname))[1];
    return caches.match(shell, { ignoreSearch: true }).then((cached) => cached || fetch(request));`,
  ) as (options: { request: Request; url: URL }) => Promise<Response>,
};
/** The same paths kept from the precached index.html's navigation route (with or without a query). */
const shellPaths = ROUTE_SHELLS.map((s) => new RegExp(s.path.source.replace(/\$$/, '(?:\\?|$)')));

/**
 * `virtual:cairn-join-words`: the few words of the join screen's first paint in each language, picked from the
 * catalogs (src/i18n/locales/*.json) by `joinWordsOf` (src/boot/join-screen.ts), so that the inline script
 * carries them and not the catalogs.
 */
function joinWordsModule(): Plugin {
  const id = 'virtual:cairn-join-words';
  return {
    name: 'cairn-join-words',
    resolveId: (source) => (source === id ? `\0${id}` : null),
    load(resolved) {
      if (resolved !== `\0${id}`) return null;
      const words = Object.fromEntries(
        LOCALES.map((l) => {
          const file = path.resolve('src/i18n/locales', `${l}.json`);
          this.addWatchFile(file);
          return [l, joinWordsOf(JSON.parse(fs.readFileSync(file, 'utf8')))];
        }),
      );
      return `export default ${JSON.stringify(words)};`;
    },
  };
}

/**
 * Puts the phone's first-screen painter (src/boot/first-screen-paint.ts) into the HTML shell as an inline
 * script right after `#app`: it runs as soon as the stylesheet has arrived, with no request of its own, and
 * paints a joined phone's kept screen (src/boot/first-screen.ts), or on a join route the join screen
 * (src/boot/join-screen.ts, with its words from `joinWordsModule`), before the app's scripts have arrived. Built
 * here on its own as one small script; the server allows exactly this script by its hash in its
 * Content-Security-Policy (server/common/client-assets.ts). In development it is a module script.
 */
function firstScreenScript(entry: string): Plugin {
  let serve = false;
  let code = '';
  return {
    name: 'cairn-first-screen',
    configResolved(config) {
      serve = config.command === 'serve';
    },
    async buildStart() {
      if (serve) return;
      const out = await build({
        configFile: false,
        logLevel: 'warn',
        publicDir: false,
        plugins: [joinWordsModule()],
        build: { write: false, minify: true, emptyOutDir: false, lib: { entry: path.resolve(entry), formats: ['iife'], name: 'cairnFirstScreen' } },
      });
      const chunk = (Array.isArray(out) ? out : [out]).flatMap((o) => ('output' in o ? o.output : [])).find((c) => c.type === 'chunk');
      if (!chunk || chunk.type !== 'chunk') return this.error('cairn-first-screen: the painter did not build');
      code = chunk.code.trim();
      if (/<\/script|<!--/i.test(code)) return this.error('cairn-first-screen: the painter holds text that would end its inline script');
    },
    transformIndexHtml: {
      order: 'post',
      handler: () =>
        serve
          ? [{ tag: 'script', attrs: { type: 'module', src: `/${entry}` }, injectTo: 'body' }]
          : [{ tag: 'script', children: code, injectTo: 'body' }],
    },
  };
}

/**
 * Marks the scripts a phone runs as its page loads with V8's compile hint (`//# allFunctionsCalledOnLoad` as the
 * file's first line, read by Chromium since version 136, a comment to every other browser): the first script and
 * everything it imports, each phone page (`pages`) with what it imports, and the activity inputs a phone page
 * loads as it shows them, with what they import. The browser then compiles their functions beside the download,
 * on another thread, instead of each on its first call on the page's thread, where they made the start's and the
 * mount's long tasks on a slow phone (measured with Lighthouse's mobile preset, docs/benchmark.md). Written into
 * the files once they are on disk: Vite puts its preload lists above any line added earlier, and the hint counts
 * only on the first line. Their brotli and gzip copies are made again, a source map's lines move down by one.
 */
function compileHints(pages: string[]): Plugin {
  const HINT = '//# allFunctionsCalledOnLoad';
  return {
    name: 'cairn-compile-hints',
    apply: 'build',
    writeBundle(options, bundle) {
      const chunks = Object.values(bundle).flatMap((c) => (c.type === 'chunk' ? [c] : []));
      const entry = chunks.find((c) => c.isEntry);
      if (!entry) return this.error('cairn-compile-hints: no entry chunk in the bundle');
      const hinted = new Set<string>();
      const reach = (file: string): void => {
        const c = bundle[file];
        if (hinted.has(file) || c?.type !== 'chunk') return;
        hinted.add(file);
        c.imports.forEach(reach);
      };
      reach(entry.fileName);
      for (const page of pages) {
        const chunk = chunkHolding(chunks, page);
        if (!chunk) return this.error(`cairn-compile-hints: no chunk for ${page}`);
        reach(chunk.fileName);
        chunk.dynamicImports.forEach(reach);
      }
      for (const file of hinted) {
        const full = path.join(options.dir!, file);
        const text = `${HINT}\n${fs.readFileSync(full, 'utf8')}`;
        fs.writeFileSync(full, text);
        for (const [copy, make] of [
          ['br', () => zlib.brotliCompressSync(text)],
          ['gz', () => zlib.gzipSync(text, { level: 9 })],
        ] as const) {
          if (fs.existsSync(`${full}.${copy}`)) fs.writeFileSync(`${full}.${copy}`, make());
        }
        if (fs.existsSync(`${full}.map`)) {
          const map = JSON.parse(fs.readFileSync(`${full}.map`, 'utf8')) as { mappings: string };
          fs.writeFileSync(`${full}.map`, JSON.stringify({ ...map, mappings: `;${map.mappings}` }));
        }
      }
    },
  };
}

const serverPort = Number(process.env.PORT ?? 3000);

/**
 * The message catalogs (src/i18n/locales/*.json and src/i18n/facilitator/*.json) compiled at build time into vue-i18n's syntax trees, so
 * the browser runs vue-i18n's runtime without its message compiler (what vue-i18n's own bundler plugin
 * does; that plugin needs Node 22). A message that does not compile fails the build.
 */
function precompiledMessages(): Plugin {
  const compileTree = (value: unknown, path: string): unknown => {
    // Plain text (none of vue-i18n's special characters) stays a string: src/i18n/index.ts shows it as it is.
    if (typeof value === 'string' && !/[{}@$|]/.test(value)) return value;
    if (typeof value === 'string') {
      const errors: string[] = [];
      const { ast } = baseCompile(value, { jit: true, location: false, minify: true, onError: (e) => errors.push(e.message) });
      if (errors.length) throw new Error(`Message ${path} does not compile: ${errors.join('; ')}`);
      return ast;
    }
    if (value && typeof value === 'object') {
      return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, compileTree(v, `${path}.${k}`)]));
    }
    return value;
  };
  return {
    name: 'cairn-precompiled-messages',
    enforce: 'pre',
    transform(code, id) {
      if (!/\/src\/i18n\/(locales|facilitator)\/[a-z]+\.json$/.test(id)) return null;
      const tree = compileTree(JSON.parse(code), id.replace(/^.*\//, ''));
      // Still JSON: Vite's own JSON step makes the module of it.
      return { code: JSON.stringify(tree), map: null };
    },
  };
}

/** The phone routes' code in a file a route and one they share (build/phone-chunks.ts): each route's page, and the activity inputs the phone page shows. */
const phoneCode = phoneChunks({
  join: [JOIN_PAGE],
  phone: [PHONE_PAGE, '/src/components/activities/ActivityPhone.vue', '/src/components/voting/VotePhone.vue'],
});

/** Vite builds the Cairn client; Vitest runs the unit, API and socket tests. */
export default defineConfig({
  // Quasar's plugin needs Vue's asset-url transform first (it throws on the wrong order).
  plugins: [
    precompiledMessages(),
    paletteInHtml(),
    vue({ template: { transformAssetUrls } }),
    quasar(),
    // The phone's shell survives a bad connection: the HTML precached, the hashed files it used kept as it
    // used them. Registered from the phone layout only (src/layouts/PhoneLayout.vue); a new build's service
    // worker takes over at once and reloads the page (autoUpdate), so nobody is left on an old shell.
    VitePWA({
      registerType: 'autoUpdate',
      injectRegister: false,
      includeManifestIcons: false,
      manifest: {
        name: 'Cairn',
        short_name: 'Cairn',
        description: 'Take part in a workshop from your phone.',
        start_url: '/join',
        scope: '/',
        display: 'standalone',
        background_color: LIGHT.background,
        theme_color: LIGHT.primary,
        icons: [
          { src: '/icon-192.png', sizes: '192x192', type: 'image/png' },
          { src: '/icon-512.png', sizes: '512x512', type: 'image/png' },
          { src: '/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        ],
      },
      workbox: {
        // Only the shell is fetched ahead: a phone on a crowded Wi-Fi never downloads the console's code.
        // The phone routes' own shells too (routeShells above): a phone's page carries the phone's stylesheet.
        globPatterns: ['index.html', 'route-shells/*.html'],
        navigateFallback: 'index.html',
        // The API, the socket and downloads go to the network, never to a cached page.
        navigateFallbackDenylist: [/^\/api\//, /^\/socket\.io\//, /^\/assets\//, ...shellPaths],
        runtimeCaching: [
          phoneShellRoute,
          {
            // Hashed files never change: once fetched, the copy is the file.
            urlPattern: ({ url, sameOrigin }) => sameOrigin && url.pathname.startsWith('/assets/'),
            handler: 'CacheFirst',
            options: { cacheName: 'cairn-assets', expiration: { maxEntries: 150 } },
          },
        ],
        cleanupOutdatedCaches: true,
        clientsClaim: true,
        skipWaiting: true,
      },
    }),
    // The regular weight sets every screen's body text, the phone's prompt and the join form included.
    preloadFont(/source-sans-3-latin-400-normal-[^/]*\.woff2$/),
    joinWordsModule(),
    firstScreenScript('src/boot/first-screen-paint.ts'),
    routeShells({ join: JOIN_PAGE, phone: PHONE_PAGE }, ['/src/pages/phone-data.vue'], ['join']),
    compileHints([JOIN_PAGE, PHONE_PAGE]),
    phoneCode.plugin,
    // Brotli and gzip copies beside each text asset, served as they are by express-static-gzip (server/app.ts).
    compression({ algorithms: ['brotliCompress', 'gzip'], include: /\.(js|mjs|css|html|svg|json|webmanifest|txt)$/, threshold: 512 }),
  ],
  resolve: {
    // vue-i18n's runtime: the catalogs come precompiled (above).
    alias: [{ find: /^vue-i18n$/, replacement: 'vue-i18n/dist/vue-i18n.runtime.mjs' }],
  },
  define: {
    __VUE_I18N_FULL_INSTALL__: 'false',
    __VUE_I18N_LEGACY_API__: 'false',
    __INTLIFY_PROD_DEVTOOLS__: 'false',
    __INTLIFY_DROP_MESSAGE_COMPILER__: 'true',
    __INTLIFY_JIT_COMPILATION__: 'true',
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    chunkSizeWarningLimit: 900,
    rolldownOptions: { output: { codeSplitting: { groups: phoneCode.groups } } },
  },
  server: {
    port: 5173,
    proxy: {
      '/api': `http://127.0.0.1:${serverPort}`,
      '/socket.io': { target: `http://127.0.0.1:${serverPort}`, ws: true },
    },
  },
  test: {
    include: ['tests/**/*.test.ts'],
    environment: 'node',
    testTimeout: 20000,
    hookTimeout: 30000,
    pool: 'forks',
  },
});
