/**
 * The default part library (db/default-library.csv, invented cost estimates) a new project
 * or the demo starts with. Read once per process.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { PartLibraryRow } from '../engine/model.ts';
import { libraryFromTable } from './library-csv.ts';
import { readCsv } from '../export/csv.ts';

let cached: PartLibraryRow[] | null = null;

export function defaultLibraryPath(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  const candidates = [resolve(here, '../../db/default-library.csv'), resolve(process.cwd(), 'db/default-library.csv')];
  return candidates.find((p) => existsSync(p)) ?? candidates[0]!;
}

export function defaultLibrary(): PartLibraryRow[] {
  if (!cached) {
    const r = libraryFromTable(readCsv(readFileSync(defaultLibraryPath(), 'utf8')));
    if (!r.ok) throw new Error(`the default part library is damaged: ${r.problems.slice(0, 3).join('; ')}`);
    cached = r.rows;
  }
  return structuredClone(cached);
}
