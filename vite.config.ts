import { defineConfig, type Plugin } from 'vitest/config';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

const serverPort = Number(process.env.KEEPWELL_PORT ?? 5180);

/**
 * @monaco-editor/loader falls back to fetching Monaco from a CDN when it is not handed an
 * instance. The client always hands it the bundled one (src/features/editor/monaco-setup.ts);
 * this removes the fallback address from the bundle so no build can ever reach for it. The
 * build fails if the loader's file changes shape, so an upgrade cannot silently bring it back.
 */
function withoutMonacoCdn(): Plugin {
  const cdnPath = /(vs:\s*)(['"])https:\/\/cdn\.jsdelivr\.net\/npm\/monaco-editor@[^'"]+\2/;
  return {
    name: 'keepwell:without-monaco-cdn',
    enforce: 'pre',
    transform(code, id) {
      if (!/@monaco-editor[\\/]loader[\\/].*config[\\/]index\.js$/.test(id)) return null;
      if (!cdnPath.test(code)) this.error(`expected the CDN default in ${id}; check @monaco-editor/loader's config after an upgrade`);
      return { code: code.replace(cdnPath, '$1$2/monaco-is-bundled$2'), map: null };
    },
  };
}

export default defineConfig({
  plugins: [react(), tailwindcss(), withoutMonacoCdn()],
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    // Monaco's lazy chunk is a few megabytes by nature; the entry chunk stays small.
    chunkSizeWarningLimit: 6000,
    // Inline nothing as data: URLs beyond tiny icons, so fonts stay separate cacheable files.
    assetsInlineLimit: 2048,
  },
  worker: { format: 'es' },
  server: {
    host: '127.0.0.1',
    port: 5173,
    proxy: { '/api': `http://127.0.0.1:${serverPort}` },
  },
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          environment: 'node',
          include: ['tests/{grammar,electrical,rules,shared,cli,recognition}/**/*.test.ts'],
          testTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'api',
          environment: 'node',
          include: ['tests/api/**/*.test.ts'],
          globalSetup: ['tests/api/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'ui',
          environment: 'jsdom',
          include: ['tests/ui/**/*.test.tsx'],
          setupFiles: ['tests/ui/setup.ts'],
          // Importing Monaco's sources for the tokenizer test takes several seconds.
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
    ],
  },
});
