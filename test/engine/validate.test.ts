// Semantic checks of requirements. The rules are common practice for power-tree
// requirements (a window needs vMin ≤ vNom ≤ vMax; time shares sum to one; a symmetric
// tolerance of ±50 % or more is not a regulated rail); each test breaks one rule of a valid
// project and checks that exactly that problem, with its path, is reported.
import { describe, expect, it } from 'vitest';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { generateProject } from '../../src-main/store/generate.ts';

const base = (): Requirements => structuredClone(demoDocument().requirements);

function only(r: Requirements): { path: string; message: string }[] {
  return validateRequirements(r);
}

describe('validateRequirements', () => {
  it('finds no problem in the demo project and in generated projects', () => {
    expect(only(base())).toEqual([]);
    for (const n of [1, 12, 60, 200]) expect(only(generateProject({ loads: n, seed: n }).requirements)).toEqual([]);
  });

  const cases: [string, (r: Requirements) => void, string, RegExp][] = [
    ['no source', (r) => { r.sources = []; }, 'sources', /at least one source/],
    ['vMin above vNom', (r) => { r.sources[0]!.vMin = 30 as never; }, 'sources[0].vMin', /above vNom/],
    ['vMax below vNom', (r) => { r.sources[0]!.vMax = 20 as never; }, 'sources[0].vMax', /below vNom/],
    ['negative source', (r) => { Object.assign(r.sources[0]!, { vMin: -30, vNom: -24, vMax: -20 }); }, 'sources[0].vMin', /negative or zero sources are not supported/],
    ['zero current limit', (r) => { r.sources[0]!.currentLimit = 0 as never; }, 'sources[0].currentLimit', /above 0 A/],
    ['NaN source voltage', (r) => { r.sources[0]!.vNom = NaN as never; }, 'sources[0].vNom', /finite/],
    ['duplicate load id', (r) => { r.loads[3]!.id = r.loads[0]!.id; }, 'loads[3].id', /already used by loads\[0\]/],
    ['duplicate domain id', (r) => { r.domains[2]!.id = r.domains[1]!.id; }, 'domains[2].id', /already used/],
    ['empty load id', (r) => { r.loads[1]!.id = ''; }, 'loads[1].id', /empty/],
    ['missing domain', (r) => { r.loads[2]!.domainId = 'nowhere'; }, 'loads[2].domainId', /"nowhere" does not exist/],
    ['shares not summing to 1', (r) => { r.modes[0]!.share = 0.7 as never; }, 'modes', /sum to 0.9/],
    ['share above 1', (r) => { r.modes[0]!.share = 1.2 as never; }, 'modes[0].share', /between 0 and 1/],
    ['negative current', (r) => { r.loads[0]!.current.measure = -0.1 as never; }, 'loads[0].current.measure', /negative/],
    ['infinite current', (r) => { r.loads[0]!.current.measure = Infinity as never; }, 'loads[0].current.measure', /finite/],
    ['current for unknown mode', (r) => { r.loads[0]!.current.sleep = 0.1 as never; }, 'loads[0].current.sleep', /mode "sleep" does not exist/],
    ['zero tolerance', (r) => { r.loads[0]!.tolerance = 0 as never; }, 'loads[0].tolerance', /above 0 and below ±50 %/],
    ['tolerance of 50 %', (r) => { r.loads[0]!.tolerance = 0.5 as never; }, 'loads[0].tolerance', /below ±50 %/],
    ['zero ripple limit', (r) => { r.loads[0]!.rippleLimit = 0 as never; }, 'loads[0].rippleLimit', /above 0 V/],
    ['zero voltage', (r) => { r.loads[0]!.voltage = 0 as never; }, 'loads[0].voltage', /must not be 0 V/],
    ['bad isolation class', (r) => { (r.domains[1] as { isolation: string }).isolation = 'double'; }, 'domains[1].isolation', /not one of none, functional, basic, reinforced/],
    ['isolated domain without working voltage', (r) => { r.domains[1]!.workingVoltage = 0 as never; }, 'domains[1].workingVoltage', /needs a working voltage/],
    ['bad noise class', (r) => { (r.loads[0] as { noiseClass: string }).noiseClass = 'silent'; }, 'loads[0].noiseClass', /not one of/],
    ['manual rail across domains', (r) => { r.loads[0]!.railKey = 'shared'; r.loads[7]!.railKey = 'shared'; r.loads[7]!.voltage = r.loads[0]!.voltage; }, 'loads[7].railKey', /different domains/],
    ['manual rail across voltages', (r) => { r.loads[0]!.railKey = 'shared'; r.loads[1]!.railKey = 'shared'; }, 'loads[1].railKey', /different voltages \(1.2 V and 3.3 V\)/],
    ['ambient above tjMax minus margin', (r) => { r.limits.ambient = 115 as never; }, 'limits.tjMax', /above the ambient/],
    ['derating above 1', (r) => { r.limits.ceramicDerating = 1.2 as never; }, 'limits.ceramicDerating', /at most 1/],
    ['all weights zero', (r) => { r.preferences.weights = { loss: 0, cost: 0, parts: 0 }; }, 'preferences.weights', /at least one weight/],
    ['negative weight', (r) => { r.preferences.weights.cost = -1; }, 'preferences.weights.cost', /≥ 0/],
    ['zero secondaries', (r) => { r.preferences.maxSecondaries = 0; }, 'preferences.maxSecondaries', /1 to 8/],
    ['no allowed kind', (r) => { r.preferences.allowedKinds = []; }, 'preferences.allowedKinds', /at least one/],
    // The demo allows all eight kinds: the ninth entry is the unknown one.
    ['unknown kind', (r) => { (r.preferences.allowedKinds as string[]).push('flyback-x'); }, 'preferences.allowedKinds[8]', /not one of/],
    ['repeated kind', (r) => { r.preferences.allowedKinds.push('boost'); }, 'preferences.allowedKinds[8]', /listed twice/],
    ['switching frequency 0', (r) => { r.preferences.switchingFrequency = 0 as never; }, 'preferences.switchingFrequency', /1 kHz and 50 MHz/],
    ['budget 0', (r) => { r.preferences.budgetMs = 0; }, 'preferences.budgetMs', /between 10 ms/],
  ];
  for (const [name, breakIt, path, msg] of cases) {
    it(`reports ${name} at ${path}`, () => {
      const r = base();
      breakIt(r);
      const problems = only(r);
      const hit = problems.find((p) => p.path === path);
      expect(hit, JSON.stringify(problems)).toBeDefined();
      expect(hit!.message).toMatch(msg);
    });
  }

  it('accepts shares that sum to 1 within 1e-6 and a manual rail that agrees', () => {
    const r = base();
    r.modes[0]!.share = (0.8 + 5e-7) as never;
    r.loads[1]!.railKey = 'io'; // Controller I/O 3.3 V, main
    r.loads[3]!.railKey = 'io'; // radio 3.3 V, main, same class
    expect(only(r)).toEqual([]);
  });

  it('reports several problems at once, one per mistake', () => {
    const r = base();
    r.sources = [];
    r.loads[0]!.tolerance = 0 as never;
    r.loads[1]!.domainId = 'x';
    expect(only(r).map((p) => p.path).sort()).toEqual(['loads[0].tolerance', 'loads[1].domainId', 'sources']);
  });
});
