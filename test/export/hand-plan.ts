/**
 * A small hand-made project and plan (invented scenario, for tests only): a 24 V input, a
 * galvanically connected main domain and one isolated sensor domain fed through a
 * coupled-winding stage. The stage designs are left empty here: the layout and drawing
 * tests need only the tree's shape. Tests that need designs build them with the stage
 * engine's designers.
 */
import type { Requirements, Rail } from '../../src-main/engine/model.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES } from '../../src-main/engine/model.ts';
import type { Plan, PlanResult } from '../../src-main/engine/plan-types.ts';
import type { StageDesign } from '../../src-main/engine/stages/index.ts';
import { groupRails } from '../../src-main/engine/rails.ts';
import type { Amps, Ratio, Volts } from '../../src-main/engine/units.ts';

const v = (x: number) => x as Volts;
const a = (x: number) => x as Amps;
const r = (x: number) => x as Ratio;

export function handRequirements(): Requirements {
  return {
    meta: { name: 'Invented test controller', description: 'Invented scenario for tests', revision: 3 },
    sources: [{ id: 'src', name: '24 V input', vNom: v(24), vMin: v(18), vMax: v(32), currentLimit: a(2) }],
    domains: [
      { id: 'main', name: 'Main', isolation: 'none', workingVoltage: v(0) },
      { id: 'sense', name: 'Sensor front end', isolation: 'basic', workingVoltage: v(60) },
    ],
    modes: [
      { id: 'run', name: 'Run', share: r(0.7) },
      { id: 'idle', name: 'Idle', share: r(0.3) },
    ],
    loads: [
      { id: 'mcu', name: 'Controller core', domainId: 'main', voltage: v(3.3), tolerance: r(0.05), current: { run: a(0.4), idle: a(0.1) }, rippleLimit: v(0.05), noiseClass: 'rugged' },
      { id: 'io', name: 'Output drivers', domainId: 'main', voltage: v(5), tolerance: r(0.05), current: { run: a(0.3), idle: a(0.05) }, rippleLimit: v(0.1), noiseClass: 'rugged' },
      { id: 'afe-p', name: 'Front end positive', domainId: 'sense', voltage: v(12), tolerance: r(0.1), current: { run: a(0.04), idle: a(0.02) }, rippleLimit: v(0.1), noiseClass: 'standard' },
      { id: 'afe-n', name: 'Front end negative', domainId: 'sense', voltage: v(-12), tolerance: r(0.1), current: { run: a(0.03), idle: a(0.015) }, rippleLimit: v(0.1), noiseClass: 'standard' },
      { id: 'adc', name: 'Converter reference', domainId: 'sense', voltage: v(5), tolerance: r(0.02), current: { run: a(0.02), idle: a(0.02) }, rippleLimit: v(0.005), noiseClass: 'quiet' },
    ],
    limits: DEFAULT_LIMITS,
    preferences: DEFAULT_PREFERENCES,
  };
}

export function railId(rails: Rail[], domainId: string, volts: number): string {
  const x = rails.find((q) => q.domainId === domainId && Math.abs(q.voltage - volts) < 1e-6);
  if (!x) throw new Error(`no rail ${domainId} ${volts}`);
  return x.id;
}

/** The hand-made tree: buck 24→3.3; coupled-winding 24→5 primary, ±12 and a 6.5 V tap; LDO tap→5 quiet. */
export function handPlan(req: Requirements, designs: Record<string, StageDesign> = {}): PlanResult {
  const rails = groupRails(req);
  const r33 = railId(rails, 'main', 3.3);
  const r5 = railId(rails, 'main', 5);
  const rp12 = railId(rails, 'sense', 12);
  const rn12 = railId(rails, 'sense', -12);
  const rq5 = railId(rails, 'sense', 5);
  const barrier = { fromDomainId: 'main', toDomainId: 'sense', isolation: 'basic' as const, workingVoltage: v(60) };
  const plan: Plan = {
    id: 'hand-1',
    labels: ['best'],
    internalNodes: [{ id: 'tap:sense:6v5', name: 'Sensor tap 6V5', domainId: 'sense', voltage: v(6.5), kind: 'tap' }],
    stages: [
      { id: 'st-buck-3v3', kind: 'buck', name: 'Buck 3V3', inputNodeId: 'src', outputs: [{ nodeId: r33, role: 'output' }], barriers: [], design: designs['st-buck-3v3'] ?? null },
      {
        id: 'st-cw-5v', kind: 'cwbuck', name: 'Coupled-winding 5V', inputNodeId: 'src',
        outputs: [
          { nodeId: r5, role: 'primary', turns: 4 },
          { nodeId: rp12, role: 'secondary', turns: 10 },
          { nodeId: rn12, role: 'secondary', turns: -10 },
          { nodeId: 'tap:sense:6v5', role: 'secondary', turns: 6 },
        ],
        barriers: [barrier], design: designs['st-cw-5v'] ?? null,
      },
      { id: 'st-ldo-5q', kind: 'ldo', name: 'LDO 5V quiet', inputNodeId: 'tap:sense:6v5', outputs: [{ nodeId: rq5, role: 'output' }], barriers: [], design: designs['st-ldo-5q'] ?? null },
    ],
    score: { loss: 0 as never, cost: 0, parts: 0, weighted: 0 },
    reasons: [
      { code: 'feed.buck', subjectId: r33, text: 'Main 3V3 gets its own buck from the 24 V input (invented reason for tests).' },
      { code: 'feed.cw', subjectId: rp12, text: 'The ±12 V sensor rails share one magnetic with the 5 V primary (invented reason for tests).' },
    ],
  };
  return { revision: req.meta.revision, rails, best: plan, alternatives: [plan], infeasible: [], stats: { explored: 1, provedOptimal: true, elapsedMs: 0, cancelled: false } };
}
