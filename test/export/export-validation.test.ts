// `export` respects validation like `plan` (issue 10 item 7): requirements whose mode
// shares sum to 200 %, or with a 1e308 A load, used to get a BOM and a report with exit 0.
// Now the CLI refuses with every problem listed and writes nothing; the window's export
// refuses the plan-based kinds and still exports the project JSON (a design in progress).
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src-main/cli.ts';
import { PROJECT_EXTENSION, ProjectStore } from '../../src-main/store/project-store.ts';
import { createApi } from '../../src-main/api/index.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import { handRequirements } from './hand-plan.ts';
import { designedHandPlan } from './hand-designs.ts';

async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const code = await runCli(args, { out: (l) => out.push(l), err: (l) => err.push(l) });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

function absurd(req: Requirements): Requirements {
  for (const m of req.modes) m.share = 1 as never;
  req.loads[0]!.current[req.modes[0]!.id] = 1e308 as never;
  return req;
}

let dir: string;
let project: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'rw-export-valid-'));
  project = join(dir, `absurd${PROJECT_EXTENSION}`);
  const store = ProjectStore.fromDocument({ requirements: handRequirements() });
  store.setPlanResult(designedHandPlan(store.getRequirements()));
  // The absurd values keep the revision, so the saved plan is not stale and export would use it as is.
  store.setRequirements(absurd(store.getRequirements()), { keepRevision: true });
  if (store.getPlanResult()?.stale !== false) throw new Error('the saved plan should be current');
  store.save(project);
  store.close();
});

describe('railwright export on requirements that plan refuses', () => {
  it('plan refuses them', async () => {
    const r = await cli(['plan', project, '--budget-ms', '200']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/modes: shares of time sum to 2/);
  });

  it('export refuses too, listing every problem, and writes nothing', async () => {
    const o = join(dir, 'out');
    const r = await cli(['export', project, '--bom', join(o, 'bom.csv'), '--report', join(o, 'report.pdf'), '--library-csv', join(o, 'lib.csv')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/fix them before exporting \(nothing was written\)/);
    expect(r.err).toMatch(/modes: shares of time sum to 2, they must sum to 1/);
    expect(r.err).toMatch(/loads\[0\]\.current\.run: current is 1\.000e\+308 A, above the 1 kA/);
    expect(existsSync(o) ? readdirSync(o) : []).toEqual([]);
  });

  it('the library CSV alone does not depend on the requirements and is still written', async () => {
    const r = await cli(['export', project, '--library-csv', join(dir, 'lib-only.csv')]);
    expect(r.code, r.err).toBe(0);
    expect(existsSync(join(dir, 'lib-only.csv'))).toBe(true);
  });
});

describe('the window export on requirements that planning refuses', () => {
  it('refuses the BOM, drawing and report with the problem named; the JSON still exports', async () => {
    const api = createApi({ host: 'test', userDataDir: null });
    const plan = designedHandPlan(handRequirements());
    api.session.replace({ requirements: absurd(handRequirements()), library: [], planResult: plan, path: null });
    for (const kind of ['bom-csv', 'tree-svg', 'report']) {
      const r = await api.request('export.file', { kind });
      expect(r.ok, kind).toBe(false);
      if (!r.ok) expect(r.error.message).toMatch(/requirements have problems; fix them before exporting: .*(modes|loads\[0\])/);
    }
    expect((await api.request('export.file', { kind: 'json' })).ok).toBe(true);
  });
});
