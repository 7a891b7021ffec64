// JSON interchange: lossless round trip, engineering notation on import, and every problem
// reported with its path. Expected SI values follow the SI Brochure prefixes (BIPM).
import { describe, expect, it } from 'vitest';
import {
  FORMAT_TAG, FORMAT_VERSION, exportProjectJson, exportProjectValue, importProjectJson, type ProjectDocument,
} from '../../src-main/store/json-format.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';

export function samplePlan(revision: number): PlanResult {
  return {
    revision,
    rails: [],
    best: null,
    alternatives: [],
    infeasible: [{ railId: 'rail:x', constraint: 'dropout', shortfall: 0.12, unit: 'V', text: 'sample', remedies: ['raise the tap'] }],
    stats: { explored: 42, provedOptimal: true, elapsedMs: 3.5, cancelled: false },
  };
}

function fullDoc(): ProjectDocument {
  const doc = demoDocument();
  doc.created = '2026-01-02T03:04:05.000Z';
  doc.modified = '2026-01-03T03:04:05.000Z';
  doc.plan = { revision: 1, computedAt: '2026-01-03T00:00:00.000Z', result: samplePlan(1) };
  doc.library = [
    { id: 'cap-1', partClass: 'cap-ceramic', name: 'Ceramic 10 µF 25 V (estimate)', cost: 0.05, params: { capacitance: 10e-6, rating: 25, nested: { a: [1, 2] } } },
    { id: 'ldo-1', partClass: 'ldo', name: 'LDO 300 mA (estimate)', cost: 0.3, params: {} },
  ];
  return doc;
}

describe('JSON export and import', () => {
  it('round-trips a whole project losslessly (requirements, plan, library, times)', () => {
    const doc = fullDoc();
    const back = importProjectJson(exportProjectJson(doc));
    expect(back.ok).toBe(true);
    if (back.ok) {
      expect(back.doc).toEqual(doc);
      expect(back.problems).toEqual([]);
    }
  });

  it('round-trips awkward numbers exactly and keeps fields added to the model later', () => {
    const doc = generateProject({ loads: 30, seed: 7 });
    doc.requirements.loads[0]!.voltage = (1 / 3) as never;
    doc.requirements.loads[1]!.current.run = 1e-12 as never;
    (doc.requirements.loads[2] as unknown as Record<string, unknown>).futureField = { x: 1 };
    doc.requirements.loads[3]!.railKey = 'manual rail';
    const text = exportProjectJson(doc);
    const back = importProjectJson(text);
    expect(back.ok && back.doc).toEqual(doc);
    // Export → import → export gives the same text (stable key order).
    expect(back.ok && exportProjectJson(back.doc)).toBe(text);
  });

  it('writes the format tag, the version and SI numbers', () => {
    const v = exportProjectValue(demoDocument()) as { format: string; version: number; loads: { voltage: unknown }[] };
    expect(v.format).toBe(FORMAT_TAG);
    expect(v.version).toBe(FORMAT_VERSION);
    expect(v.loads.every((l) => typeof l.voltage === 'number')).toBe(true);
  });

  it('accepts engineering notation for quantities on import', () => {
    const v = exportProjectValue(demoDocument()) as Record<string, any>;
    v.sources[0].vMin = '9V';
    v.sources[0].currentLimit = '1.5A';
    v.loads[0].voltage = '1V2';
    v.loads[0].tolerance = '±3%';
    v.loads[0].current.measure = '120m';
    v.loads[0].rippleLimit = '20mV';
    v.modes[0].share = '80%';
    v.preferences.switchingFrequency = '400 kHz';
    v.limits.ambient = '60 °C';
    const back = importProjectJson(JSON.stringify(v));
    expect(back.ok && back.doc).toEqual(demoDocument());
  });

  it('fills missing limits, preferences, description and noise class with defaults', () => {
    const text = JSON.stringify({
      format: FORMAT_TAG, version: 1,
      meta: { name: 'hand written' },
      sources: [{ id: 's', name: 'In', vNom: '12V', vMin: '10V', vMax: '14V', currentLimit: '2A' }],
      domains: [{ id: 'd', name: 'Main', isolation: 'none', workingVoltage: 0 }],
      modes: [{ id: 'run', name: 'Run', share: 1 }],
      loads: [{ id: 'l', name: 'Logic', domainId: 'd', voltage: '3V3', tolerance: '5%', current: { run: '100m' }, rippleLimit: '30m' }],
    });
    const r = importProjectJson(text);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.doc.requirements.loads[0]!.noiseClass).toBe('standard');
      expect(r.doc.requirements.limits.tjMax).toBe(125);
      expect(r.doc.requirements.preferences.maxSecondaries).toBe(3);
      expect(r.doc.requirements.meta).toEqual({ name: 'hand written', description: '', revision: 0 });
      expect(r.problems).toEqual([]);
    }
  });

  it('reports every structural problem with its path and reason', () => {
    const v = exportProjectValue(demoDocument()) as Record<string, any>;
    v.loads[3].current.transmit = '12x';
    v.loads[5].voltage = '5A';
    v.loads[6].tolerance = 'tight';
    delete v.sources[0].vMax;
    v.domains[1].isolation = 'double';
    v.modes[2].share = true;
    v.loads[7].noiseClass = 'loud';
    v.colour = 'blue';
    const r = importProjectJson(JSON.stringify(v));
    expect(r.ok).toBe(false);
    const got = Object.fromEntries(r.problems.map((p) => [p.path, p.message]));
    expect(got['loads[3].current.transmit']).toBe('"12x" is not a current (expected e.g. 250m, 1.2A, 250mA)');
    expect(got['loads[5].voltage']).toMatch(/"5A" is not a voltage \(A is the unit of current\)/);
    expect(got['loads[6].tolerance']).toMatch(/"tight" is not a tolerance/);
    expect(got['sources[0].vMax']).toBe('required field is missing');
    expect(got['domains[1].isolation']).toMatch(/"double" is not one of "none", "functional", "basic", "reinforced"/);
    expect(got['modes[2].share']).toMatch(/expected a number or a text/);
    expect(got['loads[7].noiseClass']).toMatch(/"loud" is not one of/);
    expect(got.colour).toBe('unknown field');
    expect(r.problems).toHaveLength(8);
  });

  it('runs the semantic checks after a structurally sound import', () => {
    const v = exportProjectValue(demoDocument()) as Record<string, any>;
    v.loads[2].domainId = 'attic';
    v.modes[0].share = 0.5;
    const r = importProjectJson(JSON.stringify(v));
    expect(r.ok).toBe(true);
    expect(r.problems.map((p) => p.path).sort()).toEqual(['loads[2].domainId', 'modes']);
  });

  const refusals: [string, string, RegExp][] = [
    ['not JSON', '{"format": ', /not valid JSON/],
    ['a list', '[]', /expected a JSON object/],
    ['another format', JSON.stringify({ format: 'other', version: 1 }), /not a Railwright project document/],
    ['a newer version', JSON.stringify({ ...exportProjectValue(demoDocument()), version: FORMAT_VERSION + 1 }), /made by a newer Railwright/],
    ['duplicate library ids', JSON.stringify({ ...exportProjectValue(demoDocument()), library: [
      { id: 'a', partClass: 'ldo', name: 'x', cost: 1, params: {} }, { id: 'a', partClass: 'ldo', name: 'y', cost: 1, params: {} }] }), /used twice/],
    ['negative cost', JSON.stringify({ ...exportProjectValue(demoDocument()), library: [
      { id: 'a', partClass: 'ldo', name: 'x', cost: -1, params: {} }] }), /cost must not be negative/],
    ['a plan without stats', JSON.stringify({ ...exportProjectValue(demoDocument()), plan: { revision: 1, computedAt: 'x', result: { revision: 1, rails: [], best: null, alternatives: [], infeasible: [] } } }), /plan.result.stats: required/],
  ];
  for (const [name, text, msg] of refusals) {
    it(`refuses ${name}`, () => {
      const r = importProjectJson(text);
      expect(r.ok).toBe(false);
      expect(r.problems.map((p) => `${p.path}: ${p.message}`).join('\n')).toMatch(msg);
    });
  }
});

describe('the documented example', () => {
  it('docs/project-json.md example imports without problems', async () => {
    const { readFileSync } = await import('node:fs');
    const md = readFileSync(new URL('../../docs/project-json.md', import.meta.url), 'utf8');
    const example = /```json\n([\s\S]*?)```/.exec(md)![1]!;
    const r = importProjectJson(example);
    expect(r.ok && r.problems).toEqual([]);
    if (r.ok) {
      expect(r.doc.requirements.loads[0]!.current).toEqual({ run: 0.04, sleep: 20e-6 }); // SI Brochure prefixes
      expect(r.doc.requirements.modes.map((m) => m.share)).toEqual([0.9, 0.1]);
    }
  });
});

describe('keys and plan revisions', () => {
  it('refuses repeated ids and a plan whose revision differs from its result', () => {
    const v = exportProjectValue(demoDocument()) as Record<string, any>;
    v.modes[2].id = 'measure';
    v.plan = { revision: 2, computedAt: 't', result: samplePlan(1) };
    const r = importProjectJson(JSON.stringify(v));
    expect(r.ok).toBe(false);
    expect(r.problems).toEqual([
      { path: 'modes[2].id', message: 'mode id "measure" is already used by entry 0' },
      { path: 'plan.revision', message: "plan revision 2 differs from its result's revision 1" },
    ]);
  });
});

describe('text encoding', () => {
  it('accepts a leading byte-order mark (common practice of some editors)', () => {
    const r = importProjectJson('\uFEFF' + exportProjectJson(demoDocument()));
    expect(r.ok && r.doc).toEqual(demoDocument());
  });
});
