/** Export one file: to a path chosen in a native dialog (desktop), or as a browser download. */
import type { ExportKind } from '../../src-main/api/contract.ts';
import { app } from './app.svelte.ts';
import { bridge } from './bridge.ts';

export async function exportFile(kind: ExportKind, ext: string, stageId?: string): Promise<void> {
  const name = `${(app.snapshot?.state.name || 'project').replace(/[^\w.-]+/g, '-')}${ext}`;
  let path: string | undefined;
  if (bridge.choosePath) {
    const p = await bridge.choosePath('export', name);
    if (!p) return;
    path = p;
  }
  // A path comes only from the system dialog, which has already asked before replacing an
  // existing file (`overwrite` carries that confirmation); without a path it is a download.
  const r = await app.call('export.file', { kind, ...(path ? { path, overwrite: true } : {}), ...(stageId ? { stageId } : {}) });
  if (!r.ok) return;
  if (r.value.writtenTo) {
    app.info(`Written to ${r.value.writtenTo}`);
    return;
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
}
