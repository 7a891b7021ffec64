/**
 * The thin file-writing shell over the pure exports: checks every target first (so a bad
 * name changes nothing), renders every file, refuses when any of them would replace an
 * existing file (unless forced), and only then writes each file atomically (temporary
 * file + rename; without force, linked into place only if nothing appeared there).
 */
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { dirname, extname, join } from 'node:path';
import { writeFileAtomic } from '../store/project-store.ts';
import {
  exportBomCsv, exportBomXlsx, exportMagneticSpecs, exportNetlists, exportReportPdf, exportTreePdf, exportTreeSvg,
  type ExportBundle,
} from './bundle.ts';

export interface ExportTargets {
  /** .csv or .xlsx */
  bom?: string;
  /** .svg or .pdf */
  tree?: string;
  /** .pdf */
  report?: string;
  /** folder for one .cir per switching stage */
  netlists?: string;
  /** folder for one .md per custom magnetic */
  magnetics?: string;
}

export class TargetError extends Error {}

/** A target that already exists (not a usage mistake: the CLI exits with 1, not 2). */
export class TargetExists extends TargetError {}

function ext(p: string): string {
  return extname(p).toLowerCase();
}

export interface WriteOptions {
  /** Replace existing files (the CLI's --force). Without it an existing file is refused. */
  force?: boolean;
  /** More files to write in the same all-or-nothing step (e.g. the library CSV). */
  extra?: { option: string; path: string; bytes: Uint8Array }[];
}

/** The refusal for an existing target: names the file and the way on. */
export function existsMessage(option: string, path: string): string {
  return `${option} ${path} already exists: nothing was written (use --force to overwrite it)`;
}

/**
 * Refuse bad targets before anything is written; names the option and the reason. An
 * existing file is refused unless `force`.
 */
export function checkTargets(t: ExportTargets, force = false): void {
  const file = (opt: string, p: string | undefined, allowed: string[]) => {
    if (p === undefined) return;
    if (p.trim() === '') throw new TargetError(`--${opt}: the file name is empty`);
    if (!allowed.includes(ext(p))) throw new TargetError(`--${opt} ${p}: the name must end in ${allowed.join(' or ')}`);
    if (existsSync(p) && statSync(p).isDirectory()) throw new TargetError(`--${opt} ${p}: is a folder, not a file`);
    if (!force && existsSync(p)) throw new TargetExists(existsMessage(`--${opt}`, p));
  };
  const dir = (opt: string, p: string | undefined) => {
    if (p === undefined) return;
    if (p.trim() === '') throw new TargetError(`--${opt}: the folder name is empty`);
    if (existsSync(p) && !statSync(p).isDirectory()) throw new TargetError(`--${opt} ${p}: is a file, not a folder`);
  };
  file('bom', t.bom, ['.csv', '.xlsx']);
  file('tree', t.tree, ['.svg', '.pdf']);
  file('report', t.report, ['.pdf']);
  dir('netlists', t.netlists);
  dir('magnetics', t.magnetics);
}

const enc = new TextEncoder();

/**
 * Write files all or nothing as far as existing files go: every target is checked
 * before the first is written. Returns one "wrote" line per file.
 */
export function writeFiles(files: { option: string; path: string; bytes: Uint8Array }[], force = false): string[] {
  if (!force) {
    for (const f of files) if (existsSync(f.path)) throw new TargetExists(existsMessage(f.option, f.path));
  }
  const done: string[] = [];
  for (const f of files) {
    mkdirSync(dirname(f.path), { recursive: true });
    try {
      writeFileAtomic(f.path, f.bytes, { replace: force });
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'EEXIST') {
        throw new TargetExists(`${existsMessage(f.option, f.path)}; it appeared while exporting${done.length ? ` (already written: ${done.map((l) => l.slice(6)).join(', ')})` : ''}`);
      }
      throw e;
    }
    done.push(`wrote ${f.path}`);
  }
  return done;
}

/** Write every requested export; returns one line per file written or skipped. */
export async function writeAll(b: ExportBundle, t: ExportTargets, opts: WriteOptions = {}): Promise<string[]> {
  const force = opts.force === true;
  checkTargets(t, force);
  const files: { option: string; path: string; bytes: Uint8Array }[] = [...(opts.extra ?? [])];
  const notes: string[] = [];
  if (t.bom) files.push({ option: '--bom', path: t.bom, bytes: ext(t.bom) === '.xlsx' ? await exportBomXlsx(b) : enc.encode(exportBomCsv(b)) });
  if (t.tree) files.push({ option: '--tree', path: t.tree, bytes: ext(t.tree) === '.pdf' ? await exportTreePdf(b) : enc.encode(exportTreeSvg(b)) });
  if (t.report) files.push({ option: '--report', path: t.report, bytes: await exportReportPdf(b) });
  if (t.netlists) {
    const n = exportNetlists(b);
    for (const f of n.files) files.push({ option: `--netlists ${t.netlists}:`, path: join(t.netlists, f.file), bytes: enc.encode(f.text) });
    for (const s of n.skipped) notes.push(`skipped netlist ${s}`);
    if (n.files.length === 0 && n.skipped.length === 0) notes.push('no switching stage: no netlist written');
  }
  if (t.magnetics) {
    const specs = exportMagneticSpecs(b);
    for (const s of specs) files.push({ option: `--magnetics ${t.magnetics}:`, path: join(t.magnetics, s.file), bytes: enc.encode(s.text) });
    if (specs.length === 0) notes.push('no custom magnetic: no specification written');
  }
  const done = writeFiles(files, force);
  // A folder asked for is there afterwards, even when nothing went into it.
  if (t.netlists) mkdirSync(t.netlists, { recursive: true });
  if (t.magnetics) mkdirSync(t.magnetics, { recursive: true });
  return [...done, ...notes];
}
