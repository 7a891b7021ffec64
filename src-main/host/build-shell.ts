/**
 * Bundles the Electron main process (ES module) and the preload (CommonJS, as a sandboxed
 * preload must be) into out/host. Run by bin/start.mjs only when Electron is installed.
 */
import { build } from 'vite';
import { builtinModules } from 'node:module';
import { fileURLToPath } from 'node:url';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));
const external = ['electron', ...builtinModules, ...builtinModules.map((m) => `node:${m}`)];

for (const [entry, fileName, format] of [
  ['./electron-main.ts', 'electron-main.cjs', 'cjs'],
  ['./preload.ts', 'preload.cjs', 'cjs'],
] as const) {
  await build({
    configFile: false,
    logLevel: 'warn',
    build: {
      outDir: here('../../out/host'),
      emptyOutDir: false,
      target: 'node20',
      minify: false,
      ssr: true,
      lib: { entry: here(entry), formats: [format], fileName: () => fileName },
      rollupOptions: { external },
    },
  });
}
