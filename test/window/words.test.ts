// The window's words for engine keys: design values named in words with units in engineering
// notation, loss terms and BOM groups as an engineer names them, polarity as a mark.
import { describe, expect, it } from 'vitest';
import { bomGroupName, designRows, lossName, splitWords, turnsText } from '../../src-renderer/lib/words.ts';
import { cost } from '../../src-renderer/lib/fmt.ts';

describe('design values in words', () => {
  const design = {
    kind: 'ldo', vinMin: 4.5, rippleFrequency: 400000, ratedCurrent: 0.15,
    outputs: [{ nodeId: 'r1', voltage: 3.3, currentMin: 0.001, currentMax: 0.2, tolerance: 0.02 }],
    package: { name: 'small outline', thetaJA: 150 },
    controller: { minOnTime: 8e-8 },
    someNewField: 12.5,
  };
  const rows = designRows(design, (id) => (id === 'r1' ? 'Main 3V3' : id));
  const get = (label: string) => rows.find(([k]) => k === label)?.[1];

  it('names every field in words, never as code', () => {
    for (const [k] of rows) {
      expect(k, k).not.toMatch(/[[\].]|[a-z][A-Z]/);
    }
    expect(get('Output 1 › current, min')).toBe('1 mA');
    expect(get('Output 1 › rail')).toBe('Main 3V3');
    expect(get('Some new field')).toBe('12.5');
  });

  it('prints values with their unit in engineering notation', () => {
    expect(get('Ripple frequency')).toBe('400 kHz');
    expect(get('Rated current')).toBe('150 mA');
    expect(get('Controller › minimum on-time')).toBe('80 ns');
    expect(get('Package › thermal resistance θJA')).toBe('150 K/W');
    expect(get('Output 1 › tolerance')).toBe('2.00 %');
  });
});

describe('loss terms, BOM groups, turns, costs', () => {
  it('names loss terms as an engineer does', () => {
    expect(lossName('hs-conduction')).toBe('high-side switch conduction');
    expect(lossName('inductor-copper')).toBe('inductor copper (DCR)');
    expect(lossName('brand-new-term')).toBe('brand new term');
  });
  it('names BOM groups in words', () => {
    expect(bomGroupName('cap-ceramic')).toBe('Ceramic capacitors');
    expect(bomGroupName('magnetic-custom')).toMatch(/^Custom magnetics/);
    expect(bomGroupName('thing-new')).toBe('Thing new');
  });
  it('writes a reversed winding as turns plus a polarity mark, never a negative count', () => {
    expect(turnsText(-46)).toBe('46 turns, reversed polarity (dot at the far end)');
    expect(turnsText(12)).toBe('12 turns');
  });
  it('never shows a non-zero cost as 0.00', () => {
    expect(cost(0.002)).toBe('0.002');
    expect(cost(0.0045)).toBe('0.0045');
    expect(cost(0)).toBe('0.00');
    expect(cost(1.234)).toBe('1.23');
    expect(splitWords('output-capacitor-esr')).toBe('output capacitor esr');
  });
});

describe('the new stage kinds in words', () => {
  it('names every stage kind and every loss term of the boost, inverting, four-switch, load-switch and module models', async () => {
    const { readFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const { STAGE_KINDS } = await import('../../src-main/engine/model.ts');
    const { designStage, evaluateStage } = await import('../../src-main/engine/stages/index.ts');
    const { parseStageFile } = await import('../../src-main/engine/stages/stage-json.ts');
    const { kindName, isNamedLoss } = await import('../../src-renderer/lib/words.ts');
    for (const k of STAGE_KINDS) expect(kindName(k), k).not.toBe(k);
    for (const k of ['boost', 'inverting', 'buck-boost-4s', 'load-switch', 'iso-module']) {
      const file = parseStageFile(JSON.parse(readFileSync(join(import.meta.dirname, `../../docs/examples/stage-${k}.json`), 'utf8'))) as { spec: Parameters<typeof designStage>[0] };
      const d = designStage(file.spec);
      expect(d.ok, k).toBe(true);
      if (!d.ok) continue;
      const ev = evaluateStage(d.design, { vin: file.spec.vinMin, iout: file.spec.outputs.map((o) => o.currentMax), ambient: file.spec.ambient });
      for (const term of Object.keys(ev.lossBreakdown)) expect(isNamedLoss(term), `${k}: ${term}`).toBe(true);
      for (const [label] of designRows(d.design, (id) => id)) expect(label, `${k}: ${label}`).not.toMatch(/[[\].]|[a-z][A-Z]/);
    }
  });
});
