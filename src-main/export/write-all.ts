/**
 * The thin file-writing shell over the pure exports: checks every target first (so a bad
 * name changes nothing), then writes each file atomically (temporary file + rename).
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

function ext(p: string): string {
  return extname(p).toLowerCase();
}

/** Refuse bad targets before anything is written; names the option and the reason. */
export function checkTargets(t: ExportTargets): void {
  const file = (opt: string, p: string | undefined, allowed: string[]) => {
    if (p === undefined) return;
    if (p.trim() === '') throw new TargetError(`--${opt}: the file name is empty`);
    if (!allowed.includes(ext(p))) throw new TargetError(`--${opt} ${p}: the name must end in ${allowed.join(' or ')}`);
    if (existsSync(p) && statSync(p).isDirectory()) throw new TargetError(`--${opt} ${p}: is a folder, not a file`);
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

/** Write every requested export; returns one line per file written or skipped. */
export async function writeAll(b: ExportBundle, t: ExportTargets): Promise<string[]> {
  checkTargets(t);
  const done: string[] = [];
  const put = (path: string, bytes: Uint8Array) => {
    mkdirSync(dirname(path), { recursive: true });
    writeFileAtomic(path, bytes);
    done.push(`wrote ${path}`);
  };
  if (t.bom) put(t.bom, ext(t.bom) === '.xlsx' ? await exportBomXlsx(b) : enc.encode(exportBomCsv(b)));
  if (t.tree) put(t.tree, ext(t.tree) === '.pdf' ? await exportTreePdf(b) : enc.encode(exportTreeSvg(b)));
  if (t.report) put(t.report, await exportReportPdf(b));
  if (t.netlists) {
    const n = exportNetlists(b);
    mkdirSync(t.netlists, { recursive: true });
    for (const f of n.files) put(join(t.netlists, f.file), enc.encode(f.text));
    for (const s of n.skipped) done.push(`skipped netlist ${s}`);
    if (n.files.length === 0 && n.skipped.length === 0) done.push('no switching stage: no netlist written');
  }
  if (t.magnetics) {
    const specs = exportMagneticSpecs(b);
    mkdirSync(t.magnetics, { recursive: true });
    for (const s of specs) put(join(t.magnetics, s.file), enc.encode(s.text));
    if (specs.length === 0) done.push('no custom magnetic: no specification written');
  }
  return done;
}
