/**
 * The demonstration project (db/demo-project.json): an invented scenario, labelled as such
 * in its description. `demoDocument()` reads and imports it; `createDemoStore()` opens it
 * as a new, unsaved project.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { importProjectJson, type ProjectDocument } from './json-format.ts';
import { ProjectStore, type StoreOptions } from './project-store.ts';

let demoPathOverride: string | null = null;

/** Hosts that move the db folder (a packaged app) say where the demo file is. */
export function setDemoPath(path: string | null): void {
  demoPathOverride = path;
}

export function demoPath(): string {
  if (demoPathOverride) return demoPathOverride;
  const here = dirname(fileURLToPath(import.meta.url));
  const candidates = [resolve(here, '../../db/demo-project.json'), resolve(here, '../db/demo-project.json'), resolve(process.cwd(), 'db/demo-project.json')];
  return candidates.find((p) => existsSync(p)) ?? candidates[0]!;
}

export function demoDocument(): ProjectDocument {
  const path = demoPath();
  const r = importProjectJson(readFileSync(path, 'utf8'));
  if (!r.ok) throw new Error(`the demo project ${path} is damaged: ${r.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
  return r.doc;
}

export function createDemoStore(opts: StoreOptions = {}): ProjectStore {
  return ProjectStore.fromDocument(demoDocument(), opts);
}
