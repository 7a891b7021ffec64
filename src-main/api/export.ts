/**
 * Export handler: every export format through one request. Returns the bytes (base64) for
 * the window to download, or writes them to a path the host's path policy accepts.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import { z } from 'zod';
import { exportProjectJson } from '../store/json-format.ts';
import {
  exportBomCsv, exportBomXlsx, exportMagneticSpecs, exportNetlists, exportReportPdf, exportTreePdf, exportTreeSvg,
  prepareExport, ExportError,
} from '../export/bundle.ts';
import { existsSync } from 'node:fs';
import { writeFileAtomic } from '../store/project-store.ts';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import type { ExportFile, ExportKind } from './contract.ts';
import { libraryRows } from './figures.ts';
import { planningProblems } from './plan-job.ts';
import type { PartLibraryRow } from '../engine/model.ts';
import { PLOT_SVG_MAX, plotSvgFile, PlotFileError } from '../export/plot-file.ts';

const kinds = z.enum(['bom-csv', 'bom-xlsx', 'tree-svg', 'tree-pdf', 'report', 'json', 'spice', 'magnetics', 'plot-svg']);

const META: Record<ExportKind, { ext: string; mime: string; suffix: string }> = {
  'bom-csv': { ext: '.csv', mime: 'text/csv', suffix: '-bom' },
  'bom-xlsx': { ext: '.xlsx', mime: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', suffix: '-bom' },
  'tree-svg': { ext: '.svg', mime: 'image/svg+xml', suffix: '-tree' },
  'tree-pdf': { ext: '.pdf', mime: 'application/pdf', suffix: '-tree' },
  report: { ext: '.pdf', mime: 'application/pdf', suffix: '-report' },
  json: { ext: '.json', mime: 'application/json', suffix: '' },
  spice: { ext: '.cir', mime: 'text/plain', suffix: '-netlists' },
  magnetics: { ext: '.md', mime: 'text/markdown', suffix: '-magnetics' },
  'plot-svg': { ext: '.svg', mime: 'image/svg+xml', suffix: '-plot' },
};

let elk: InstanceType<typeof ELK> | null = null;

function baseName(s: Session): string {
  return (s.requirements.meta.name || 'project').replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '') || 'project';
}

async function render(s: Session, kind: ExportKind, stageId: string | undefined, svg?: string): Promise<Uint8Array> {
  const enc = (t: string) => new TextEncoder().encode(t);
  if (kind === 'plot-svg') {
    try {
      return enc(plotSvgFile(svg ?? ''));
    } catch (e) {
      if (e instanceof PlotFileError) throw new ApiFailure(`plot-svg: ${e.message}`, 'svg');
      throw e;
    }
  }
  if (kind === 'json') {
    const plan = s.planResult ? { revision: s.planResult.revision, computedAt: new Date().toISOString(), result: s.planResult } : undefined;
    return enc(exportProjectJson({ requirements: s.requirements, library: (Array.isArray(s.library) ? s.library : []) as PartLibraryRow[], ...(plan ? { plan } : {}) }));
  }
  const r = s.planResult;
  if (!r) throw new ApiFailure(`${kind}: there is no plan to export yet (press Plan first)`, 'kind');
  // The same gate as planning: no drawing, BOM or report of requirements the planner refuses.
  const problems = planningProblems(s.requirements);
  if (problems.length) {
    const p = problems[0]!;
    throw new ApiFailure(`${kind}: the requirements have problems; fix them before exporting: ${p.path}: ${p.message}${problems.length > 1 ? ` (and ${problems.length - 1} more)` : ''}`, p.path);
  }
  const selected = r.alternatives.find((p) => p.id === s.selectedId) ?? r.best;
  elk ??= new ELK();
  let b;
  try {
    const modeId = s.drawingModeId && s.requirements.modes.some((m) => m.id === s.drawingModeId) ? s.drawingModeId : undefined;
    b = await prepareExport({ req: s.requirements, result: { ...r, best: selected }, library: libraryRows(s), elk, replanned: false, ...(modeId ? { modeId } : {}) });
  } catch (e) {
    if (e instanceof ExportError) throw new ApiFailure(`${kind}: ${e.message}`, 'kind');
    throw e;
  }
  switch (kind) {
    case 'bom-csv': return enc(exportBomCsv(b));
    case 'bom-xlsx': return exportBomXlsx(b);
    case 'tree-svg': return enc(exportTreeSvg(b));
    case 'tree-pdf': return exportTreePdf(b);
    case 'report': return exportReportPdf(b);
    case 'spice': {
      const n = exportNetlists(b);
      const files = n.files.filter((f) => !stageId || f.stageId === stageId);
      if (!files.length) throw new ApiFailure(`spice: no switching stage to write a netlist for${n.skipped.length ? ` (${n.skipped.join('; ')})` : ''}`, 'kind');
      return enc(files.map((f) => `* ---- ${f.file} ----\n${f.text}`).join('\n'));
    }
    case 'magnetics': {
      const specs = exportMagneticSpecs(b).filter((m) => !stageId || m.stageId === stageId);
      if (!specs.length) throw new ApiFailure('magnetics: this tree has no custom coupled-winding magnetic', 'kind');
      return enc(specs.map((m) => m.text).join('\n\n---\n\n'));
    }
  }
}

function exists(target: string): ApiFailure {
  return new ApiFailure(`${target} already exists: nothing was written. Confirm that it may be replaced, or choose another name`, 'path', 'exists');
}

export const exportHandlers = {
  'export.file': handler('export.file', z.object({
    kind: kinds, path: z.string().min(1).max(1024).optional(), stageId: z.string().max(200).optional(), overwrite: z.boolean().optional(),
    svg: z.string().max(PLOT_SVG_MAX).optional(), plotName: z.string().min(1).max(80).optional(),
  }).strict(),
    async (s: Session, a): Promise<ExportFile> => {
      const meta = META[a.kind];
      const target = a.path !== undefined ? s.pathPolicy(a.path, 'export', meta.ext) : null;
      const replace = a.overwrite === true;
      if (target && !replace && existsSync(target)) throw exists(target);
      if (a.kind !== 'plot-svg' && (a.svg !== undefined || a.plotName !== undefined)) throw new ApiFailure(`svg: only a plot-svg export takes plot markup (kind is ${a.kind})`, 'svg');
      const bytes = await render(s, a.kind, a.stageId, a.svg);
      if (target) {
        try {
          // Without the confirmation the file is only created, never replaced, even if
          // it appeared while the export was rendered.
          writeFileAtomic(target, bytes, { replace });
        } catch (e) {
          if ((e as NodeJS.ErrnoException).code === 'EEXIST') throw exists(target);
          throw new ApiFailure(`could not write ${target}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`, 'path');
        }
      }
      return {
        // One stage's netlist is named after its stage, so several downloads never collide.
        fileName: a.kind === 'plot-svg' && a.plotName ? `${baseName(s)}-${a.plotName.replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '') || 'plot'}${meta.ext}`
          : a.kind === 'spice' && a.stageId ? `${baseName(s)}-${a.stageId.replace(/[^\w.-]+/g, '-')}${meta.ext}` : `${baseName(s)}${meta.suffix}${meta.ext}`,
        mime: meta.mime,
        base64: target ? '' : Buffer.from(bytes).toString('base64'),
        writtenTo: target,
      };
    }),
};
