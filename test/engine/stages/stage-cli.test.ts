// `railwright stage` / `railwright netlist` over the documented example files.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../../src-main/cli.ts';
import { parseStageFile } from '../../../src-main/engine/stages/stage-json.ts';

const EX = join(import.meta.dirname, '../../../docs/examples');

async function cli(args: string[]) {
  const out: string[] = [];
  const err: string[] = [];
  const code = await runCli(args, { out: (l) => out.push(l), err: (l) => err.push(l) });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

describe('railwright stage', () => {
  for (const kind of ['buck', 'cwbuck', 'ldo']) {
    it(`computes the ${kind} example: design, evaluation, windows`, async () => {
      const r = await cli(['stage', join(EX, `stage-${kind}.json`)]);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      const j = JSON.parse(r.out);
      expect(j.kind).toBe(kind);
      expect(j.evaluation.pin).toBeCloseTo(j.evaluation.pout + j.evaluation.loss, 9);
      expect(j.windows.length).toBe(j.design.outputs.length);
      expect(j.reasons.length).toBeGreaterThan(0);
      if (kind === 'cwbuck') {
        expect(j.windows[0].monteCarlo.runs).toBe(500);
        expect(j.magnetic.isolation).toEqual({ class: 'basic', workingVoltage: 50 });
      }
    });
  }
  it('evaluates a saved design with an edited value and its own operating point', async () => {
    const first = JSON.parse((await cli(['stage', join(EX, 'stage-buck.json')])).out);
    const dir = mkdtempSync(join(tmpdir(), 'rw-stage-'));
    const design = { ...first.design, inductance: first.design.inductance * 2 };
    writeFileSync(join(dir, 'd.json'), JSON.stringify({ design, operatingPoint: { vin: '14V', iout: ['1A'], ambient: 25 } }));
    const r = await cli(['stage', join(dir, 'd.json')]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.evaluation.vin).toBe(14);
    expect(j.design.inductance).toBeCloseTo(first.design.inductance * 2, 15);
    expect(j.reasons).toEqual([]);
  });
  it('reports a bad field by its path and exits 1', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rw-stage-'));
    const spec = JSON.parse(readFileSync(join(EX, 'stage-buck.json'), 'utf8'));
    spec.spec.outputs[0].currentMax = '2 kV';
    writeFileSync(join(dir, 'bad.json'), JSON.stringify(spec));
    const r = await cli(['stage', join(dir, 'bad.json')]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/spec\.outputs\[0\]\.currentMax/);
    const good = JSON.parse(readFileSync(join(EX, 'stage-buck.json'), 'utf8'));
    expect(() => parseStageFile({ spec: good.spec, design: {} })).toThrow(/design.kind: one of/);
    expect(() => parseStageFile({ spec: good.spec, design: { kind: 'buck', outputs: [{}] } })).toThrow(/not both/);
  });
  it('prints { ok: false, flags } and exits 1 when the spec cannot be designed', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rw-stage-'));
    const spec = JSON.parse(readFileSync(join(EX, 'stage-buck.json'), 'utf8'));
    spec.spec.outputs[0].voltage = '11V';
    writeFileSync(join(dir, 'x.json'), JSON.stringify(spec));
    const r = await cli(['stage', join(dir, 'x.json')]);
    expect(r.code).toBe(1);
    const j = JSON.parse(r.out);
    expect(j.ok).toBe(false);
    expect(j.flags[0].text).toMatch(/\d/);
  });
});

describe('railwright netlist', () => {
  it('prints the coupled-winding netlist and refuses an LDO', async () => {
    const r = await cli(['netlist', join(EX, 'stage-cwbuck.json')]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^\* Railwright open-loop netlist: coupled-winding buck stage, 3 secondaries/);
    expect(r.out).toMatch(/\.end$/);
    const l = await cli(['netlist', join(EX, 'stage-ldo.json')]);
    expect(l.code).toBe(1);
    expect(l.err).toMatch(/LDO does not switch/);
  });
});
