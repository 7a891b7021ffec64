// Import specifiers of a TypeScript or Svelte source, for the boundary checks
// (test/boundaries.test.ts, test/engine/purity.test.ts). Reads static `import … from`,
// `export … from`, side-effect `import '…'` and dynamic `import('…')`, across line breaks.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';

/** Every .ts and .svelte file under `dir`, recursively. */
export function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    if (statSync(p).isDirectory()) return sourceFiles(p);
    return p.endsWith('.ts') || p.endsWith('.svelte') ? [p] : [];
  });
}

const IMPORT = /\b(?:import|export)\s+(?:type\s+)?[^'";]*?\bfrom\s*['"]([^'"]+)['"]|\bimport\s*['"]([^'"]+)['"]|\bimport\s*\(\s*['"`]([^'"`]+)['"`]\s*\)/g;

/**
 * The module specifiers a source text names. Comments are scanned too: an import written in
 * a comment counts (a false alarm is visible; a stripped real import would pass unseen).
 */
export function importSpecifiers(src: string): string[] {
  return [...src.matchAll(IMPORT)].map((m) => (m[1] ?? m[2] ?? m[3])!);
}

/** A relative specifier resolved to an absolute path; a bare one (package, node:) as is. */
export function resolveSpecifier(file: string, spec: string): string {
  return spec.startsWith('.') ? resolve(dirname(file), spec) : spec;
}

/** Whether a dynamic import names its module by a computed expression (not checkable). */
export function hasComputedImport(src: string): boolean {
  return /\bimport\s*\(\s*[^'"`\s)]/.test(src);
}

export const readSource = (file: string): string => readFileSync(file, 'utf8');
