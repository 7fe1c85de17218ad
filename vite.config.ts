import { gzipSync } from 'node:zlib';
import tailwindcss from '@tailwindcss/vite';
import react from '@vitejs/plugin-react';
import type { Plugin } from 'vite';
import { defineConfig } from 'vitest/config';

/** Prints the JavaScript a first visit downloads (the entry chunk and its static imports), gzipped. */
function initialJsReport(): Plugin {
  return {
    name: 'ballast-initial-js',
    apply: 'build',
    generateBundle(_options, bundle) {
      const chunks = new Map(
        Object.values(bundle).flatMap((c) => (c.type === 'chunk' ? [[c.fileName, c] as const] : [])),
      );
      const initial = new Set<string>();
      const visit = (name: string) => {
        if (initial.has(name)) return;
        initial.add(name);
        for (const imported of chunks.get(name)?.imports ?? []) visit(imported);
      };
      for (const chunk of chunks.values()) if (chunk.isEntry) visit(chunk.fileName);
      const gzipped = [...initial].reduce((sum, name) => sum + gzipSync(chunks.get(name)!.code).length, 0);
      const lazy = chunks.size - initial.size;
      console.log(
        `\nBallast initial JS: ${(gzipped / 1024).toFixed(1)} kB gzipped (${initial.size} chunks; ${lazy} lazy chunks load per screen)`,
      );
    },
  };
}

const apiPort = Number(process.env.BALLAST_API_PORT ?? 4600);

export default defineConfig({
  plugins: [react(), tailwindcss(), initialJsReport()],
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    chunkSizeWarningLimit: 600,
  },
  server: {
    port: 5173,
    proxy: { '/api': `http://127.0.0.1:${apiPort}` },
  },
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/shared/**/*.test.ts', 'tests/**/*.unit.test.ts'],
          environment: 'node',
          // A guard against a hang, not a speed check: unit files share the two cores with the server and
          // e2e projects, and the 5 s default was within reach of the busiest ones (speed: npm run bench).
          testTimeout: 30_000,
        },
      },
      {
        test: {
          name: 'server',
          include: ['tests/server/**/*.test.ts', 'tests/jobs/**/*.test.ts'],
          exclude: ['**/*.unit.test.ts', '**/node_modules/**'],
          environment: 'node',
          globalSetup: ['tests/helpers/global-setup.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/helpers/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
