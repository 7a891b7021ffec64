/** Export one file: to a path chosen in a native dialog (desktop), or as a browser download. */
import type { ExportKind } from '../../src-main/api/contract.ts';
import { app } from './app.svelte.ts';
import { bridge } from './bridge.ts';

/**
 * SPICE netlists: one runnable file per switching stage (each a complete circuit ending in
 * `.end`, so `ngspice -b` runs it alone), as separate downloads named after the stage.
 */
export async function exportNetlists(): Promise<void> {
  const stages = (app.snapshot?.plan?.selected?.stages ?? []).filter((s) => s.kind !== 'ldo');
  if (!stages.length) { app.fail({ message: 'spice: this tree has no switching stage to write a netlist for (an LDO has none)' }); return; }
  let done = 0;
  for (const st of stages) if (await exportFile('spice', '.cir', st.id, `-${st.id}`)) done++;
  if (done === stages.length) app.info(`Downloaded ${done} netlist${done === 1 ? '' : 's'}, one per switching stage: run each with ngspice -b <file>.`);
}

/** `plot`: a plot this window drew (lib/plot-svg.ts), for the plot-svg kind. */
export async function exportFile(kind: ExportKind, ext: string, stageId?: string, suffix = '', plot?: { svg: string; plotName: string }): Promise<boolean> {
  const name = `${(app.snapshot?.state.name || 'project').replace(/[^\w.-]+/g, '-')}${suffix}${ext}`;
  let path: string | undefined;
  if (bridge.choosePath) {
    const p = await bridge.choosePath('export', name);
    if (!p) return false;
    path = p;
  }
  // A path comes only from the system dialog, which has already asked before replacing an
  // existing file (`overwrite` carries that confirmation); without a path it is a download.
  const r = await app.call('export.file', { kind, ...(path ? { path, overwrite: true } : {}), ...(stageId ? { stageId } : {}), ...(plot ? { svg: plot.svg, plotName: plot.plotName } : {}) });
  if (!r.ok) return false;
  if (r.value.writtenTo) {
    app.info(`Written to ${r.value.writtenTo}`);
    return true;
  }
  const bytes = Uint8Array.from(atob(r.value.base64), (c) => c.charCodeAt(0));
  const url = URL.createObjectURL(new Blob([bytes], { type: r.value.mime }));
  const a = document.createElement('a');
  a.href = url;
  a.download = r.value.fileName;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
  app.info(`Downloaded ${r.value.fileName}`);
  return true;
}
