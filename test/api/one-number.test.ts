// Issue 15 item 8, one number per quantity: on the demo, planned by the real planner in its
// worker, every figure two views show comes from one computation. The Alternatives figures
// of the chosen tree equal the Budget's time-weighted loss and the Parts view's BOM total
// and part count, for every alternative once it is the chosen one; the system and stage
// tables carry V min, nom and max; a tap whose computed voltage differs from the planned one
// says both, named as such.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApi } from '../../src-main/api/index.ts';
import { openDemo } from '../../src-main/api/files.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import type { Snapshot } from '../../src-main/api/contract.ts';
import { fmtQty } from '../../src-main/engine/layout.ts';

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'rw-one-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function ok<T>(p: Promise<{ ok: boolean; value?: unknown; error?: { message: string } }>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new Error(r.error!.message);
  return r.value as T;
}

describe('one number per quantity (demo, real planner)', () => {
  it('Alternatives, Budget, Parts and the tree agree', { timeout: 150_000 }, async () => {
    const events: { e: string; p: unknown }[] = [];
    const api = createApi({
      host: 'test', userDataDir: join(dir, 'data'),
      pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }),
      emit: (e, p) => events.push({ e, p }),
    });
    openDemo(api.session);
    await ok(api.request('plan.start', {}));
    await new Promise<void>((resolve) => {
      const t = setInterval(() => { if (events.some((x) => x.e === 'plan.finished')) { clearInterval(t); resolve(); } }, 50);
    });
    let snap = await ok<Snapshot>(api.request('project.snapshot', {}));
    const alts = snap.plan!.result.alternatives;
    expect(alts.length).toBeGreaterThanOrEqual(1);
    expect(snap.plan!.alternatives.map((a) => a.planId)).toEqual(alts.map((a) => a.id));
    for (const a of alts) {
      snap = await ok<Snapshot>(api.request('plan.select', { planId: a.id }));
      const pv = snap.plan!;
      const f = pv.alternatives.find((x) => x.planId === a.id)!;
      expect(f.note).toBeNull();
      // Same computation, so equal to the last bit (not "close").
      expect(f.weightedLoss).toBe(pv.rollup!.weightedLoss);
      expect(f.cost).toBe(pv.bom!.total);
      expect(f.parts).toBe(pv.bom!.parts);
      // The time-weighted loss is the share-weighted sum of the per-mode losses at V nom
      // (definition of a time-weighted mean, common practice).
      const modes = snap.requirements.modes;
      const byMode = pv.rollup!.system.map((x) => x.cases.vNom.loss * modes.find((m) => m.id === x.modeId)!.share);
      expect(pv.rollup!.weightedLoss).toBeCloseTo(byMode.reduce((s, x) => s + x, 0), 9);
      // Per-mode tables at V min, nom and max, each consistent (loss = P in − P out).
      for (const x of pv.rollup!.system) {
        expect(x.loss).toBe(x.cases.vNom.loss);
        for (const c of [x.cases.vMin, x.cases.vNom, x.cases.vMax]) expect(c.loss).toBeCloseTo(c.pin - c.pout, 9);
      }
      for (const st of pv.rollup!.stages) {
        expect(st.byCase.vNom.loss).toBe(st.loss);
        expect(st.byCase.vMin).not.toBeNull();
        expect(st.byCase.vMax).not.toBeNull();
      }
      // The tree's stage text shows the roll-up's loss of the drawn mode.
      const drawn = pv.drawingModeId ?? pv.rollup!.system.reduce((b, x) => (x.pout > b.pout ? x : b)).modeId;
      for (const n of pv.layout!.nodes.filter((q) => q.kind === 'stage')) {
        const fig = pv.rollup!.stages.find((s) => s.stageId === n.id && s.modeId === drawn)!;
        expect(n.sub.join(' '), n.label).toContain(`loss ${fmtQty(fig.loss, 'W')}`);
      }
      // A tap: its name's planned voltage and the computed one, each named.
      for (const n of pv.layout!.nodes.filter((q) => q.kind === 'internal')) {
        const node = pv.selected!.internalNodes.find((q) => q.id === n.id)!;
        const line = n.sub[0]!;
        const planned = fmtQty(node.voltage, 'V', 4);
        if (line.includes('computed')) expect(line).toMatch(new RegExp(`nominal ${planned.replace('.', '\\.')}, computed -?[\\d.]+ m?V$`));
        else expect(line).toMatch(new RegExp(`${planned.replace('.', '\\.')}$`));
      }
    }
  });
});
