import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { compression } from 'vite-plugin-compression2';

const serverPort = Number(process.env.PORT ?? 3000);

/** Vite builds the Cairn client; Vitest runs the unit, API and socket tests. */
export default defineConfig({
  // Quasar's plugin needs Vue's asset-url transform first (it throws on the wrong order).
  plugins: [
    vue({ template: { transformAssetUrls } }),
    quasar(),
    // Brotli and gzip copies beside each text asset, served as they are by express-static-gzip (server/app.ts).
    compression({ algorithms: ['brotliCompress', 'gzip'], include: /\.(js|mjs|css|html|svg|json|webmanifest|txt)$/, threshold: 512 }),
  ],
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    chunkSizeWarningLimit: 900,
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
