/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import { svelte } from '@sveltejs/vite-plugin-svelte';
import { fileURLToPath } from 'node:url';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

// One config for the window build (Vite, root src-renderer → out/renderer) and the test
// runner (vitest, which ignores the root and runs test/**).
export default defineConfig({
  root: here('./src-renderer'),
  base: './',
  plugins: [svelte()],
  build: {
    outDir: here('./out/renderer'),
    emptyOutDir: true,
    target: 'es2022',
  },
  test: {
    root: here('.'),
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
