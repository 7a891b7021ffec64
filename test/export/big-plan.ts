/**
 * A large plan built by hand rules (not by the planner) over a generated project, for the
 * roll-up and export tests and benchmarks. Generated data, not a real design. Rules:
 * main-domain rails of 3.3 V and above get their own buck from the input; lower ones an LDO
 * from a 5 V internal bus fed by one buck (a buck from that bus above 0.3 A); each isolated domain gets one coupled-winding
 * stage per tap (fewer if the designer allows) whose primary is a 5 V bus in the main domain and whose secondaries are taps
 * (+18.5 V, −18.5 V, 7.5 V) in the isolated domain, each rail then an LDO from its tap.
 * Tolerances below ±3 % are widened to ±3 % (an LDO's accuracy is ±1.5 %) and isolated loads
 * are scaled to at most 40 mA (a coupled-winding stage suits small power).
 */
import { designStage, type StageDesign } from '../../src-main/engine/stages/index.ts';
import type { OutputSpec, StageSpec } from '../../src-main/engine/stages/types.ts';
import type { Id, Rail, Requirements } from '../../src-main/engine/model.ts';
import type { InternalNode, Plan, PlanResult, PlanStage } from '../../src-main/engine/plan-types.ts';
import { groupRails, railPeakCurrent } from '../../src-main/engine/rails.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import type { Amps, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';

function must(spec: StageSpec, what: string): StageDesign {
  const r = designStage(spec);
  if (!r.ok) throw new Error(`${what}: designer refused: ${r.flags.map((f) => f.text).join('; ')}`);
  return r.design;
}

function outSpec(nodeId: Id, v: number, tol: number, imin: number, imax: number, ripple: number): OutputSpec {
  return { nodeId, voltage: v as Volts, tolerance: tol as Ratio, currentMin: imin as Amps, currentMax: imax as Amps, rippleLimit: ripple as Volts };
}

export function bigRequirements(loads: number, seed = 7, isolatedDomains?: number): Requirements {
  const req = generateProject({ loads, seed, ...(isolatedDomains !== undefined ? { isolatedDomains } : {}) }).requirements;
  for (const l of req.loads) {
    if (l.tolerance < 0.03) l.tolerance = 0.03 as Ratio;
    if (l.rippleLimit < 0.01) l.rippleLimit = 0.01 as Volts;
    if (l.domainId !== 'main') {
      const peak = Math.max(...Object.values(l.current));
      if (peak > 0.04) for (const k of Object.keys(l.current)) l.current[k] = ((l.current[k]! * 0.04) / peak) as Amps;
    }
  }
  return req;
}

export function bigPlan(req: Requirements): PlanResult {
  const rails = groupRails(req);
  const src = req.sources[0]!;
  const base = { vinMin: src.vMin, vinNom: src.vNom, vinMax: src.vMax, fsw: 400e3 as Hertz, ambient: req.limits.ambient, tjMax: req.limits.tjMax, ceramicDerating: req.limits.ceramicDerating };
  const iMin = (r: Rail) => Math.min(...Object.values(r.current));
  const stages: PlanStage[] = [];
  const nodes: InternalNode[] = [];
  const ro = (r: Rail) => outSpec(r.id, r.voltage, r.tolerance, iMin(r), railPeakCurrent(r), r.rippleLimit);
  const ldoFrom = (r: Rail, tap: Id, vtap: number, tolTap: number, ripple: number): PlanStage => {
    const id = `ldo-${stages.length}`;
    const design = must({
      kind: 'ldo', vinMin: (vtap * (1 - Math.sign(vtap) * tolTap)) as Volts, vinNom: vtap as Volts, vinMax: (vtap * (1 + Math.sign(vtap) * tolTap)) as Volts,
      vinRipple: ripple as Volts, outputs: [ro(r)], fsw: 400e3 as Hertz, ambient: req.limits.ambient, tjMax: req.limits.tjMax, ceramicDerating: req.limits.ceramicDerating,
    }, `LDO for ${r.name}`);
    return { id, kind: 'ldo', name: `LDO ${r.name}`, inputNodeId: tap, outputs: [{ nodeId: r.id, role: 'output' }], barriers: [], design };
  };

  // Main domain.
  const main = rails.filter((r) => r.domainId === 'main');
  const low = main.filter((r) => Math.abs(r.voltage) < 3.3);
  for (const r of main.filter((x) => Math.abs(x.voltage) >= 3.3)) {
    stages.push({ id: `buck-${stages.length}`, kind: 'buck', name: `Buck ${r.name}`, inputNodeId: src.id, outputs: [{ nodeId: r.id, role: 'output' }], barriers: [], design: must({ kind: 'buck', ...base, outputs: [ro(r)] }, `buck for ${r.name}`) });
  }
  if (low.length) {
    const bus: InternalNode = { id: 'bus:main:5v', name: 'Main bus 5V', domainId: 'main', voltage: 5 as Volts, kind: 'bus' };
    nodes.push(bus);
    const heavy = (r: Rail) => railPeakCurrent(r) > 0.3;
    const iBus = low.reduce((a, r) => a + (heavy(r) ? (Math.abs(r.voltage) * railPeakCurrent(r)) / (4.85 * 0.8) : railPeakCurrent(r)), 0) * 1.05 + 0.001;
    stages.push({ id: 'buck-bus', kind: 'buck', name: 'Buck main bus 5V', inputNodeId: src.id, outputs: [{ nodeId: bus.id, role: 'output' }], barriers: [], design: must({ kind: 'buck', ...base, outputs: [outSpec(bus.id, 5, 0.03, 0, iBus, 0.05)] }, 'bus buck') });
    for (const r of low) {
      if (!heavy(r)) { stages.push(ldoFrom(r, bus.id, 5, 0.03, 0.05)); continue; }
      const design = must({ kind: 'buck', ...base, vinMin: 4.85 as Volts, vinNom: 5 as Volts, vinMax: 5.15 as Volts, outputs: [ro(r)] }, `buck for ${r.name}`);
      stages.push({ id: `buck-${stages.length}`, kind: 'buck', name: `Buck ${r.name}`, inputNodeId: bus.id, outputs: [{ nodeId: r.id, role: 'output' }], barriers: [], design });
    }
  }

  // Isolated domains.
  for (const d of req.domains.filter((x) => x.isolation !== 'none')) {
    const rs = rails.filter((r) => r.domainId === d.id);
    if (!rs.length) continue;
    const groups: Array<{ v: number; members: Rail[] }> = [
      { v: 18.5, members: rs.filter((r) => r.voltage > 6) },
      { v: -18.5, members: rs.filter((r) => r.voltage < 0) },
      { v: 7.5, members: rs.filter((r) => r.voltage > 0 && r.voltage <= 6) },
    ].filter((g) => g.members.length > 0);
    // One coupled-winding stage per tap group, its primary a 5 V bus of the main domain; a
    // group the designer refuses is split into one stage per rail.
    const tryStage = (g: { v: number; members: Rail[] }, key: string): boolean => {
      const pri: InternalNode = { id: `bus:${d.id}:${key}:pri`, name: `${d.name} ${key} primary 5V`, domainId: 'main', voltage: 5 as Volts, kind: 'bus' };
      const tap: InternalNode = { id: `tap:${d.id}:${key}`, name: `${d.name} tap ${g.v} V (${key})`, domainId: d.id, voltage: g.v as Volts, kind: 'tap' };
      const imax = g.members.reduce((a, r) => a + railPeakCurrent(r), 0) * 1.02 + 0.001;
      const imin = g.members.reduce((a, r) => a + iMin(r), 0);
      let r = designStage({ kind: 'cwbuck', ...base, outputs: [outSpec(pri.id, 5, 0.05, 0, 0.01, 0.1), outSpec(tap.id, g.v, 0.1, imin, imax, 0.1)] });
      for (const tol of [0.15, 0.2, 0.25]) {
        if (r.ok) break;
        r = designStage({ kind: 'cwbuck', ...base, outputs: [outSpec(pri.id, 5, 0.05, 0, 0.01, 0.1), outSpec(tap.id, g.v, tol, imin, imax, 0.1)] });
      }
      if (!r.ok) return false;
      nodes.push(pri, tap);
      stages.push({
        id: `cw-${d.id}-${key}`, kind: 'cwbuck', name: `Coupled-winding ${d.name} ${key}`, inputNodeId: src.id,
        outputs: [{ nodeId: pri.id, role: 'primary' }, { nodeId: tap.id, role: 'secondary' }],
        barriers: [{ fromDomainId: 'main', toDomainId: d.id, isolation: d.isolation === 'none' ? 'functional' : d.isolation, workingVoltage: d.workingVoltage }],
        design: r.design,
      });
      for (const m of g.members) stages.push(ldoFrom(m, tap.id, g.v, 0.1, 0.1));
      return true;
    };
    groups.forEach((g, gi) => {
      if (tryStage(g, `g${gi}`)) return;
      for (const m of g.members) {
        if (!tryStage({ v: g.v, members: [m] }, `r${stages.length}`)) throw new Error(`no coupled-winding stage for ${m.name}`);
      }
    });
  }
  const plan: Plan = { id: 'big', labels: ['best'], stages, internalNodes: nodes, score: { loss: 0 as never, cost: 0, parts: 0, weighted: 0 }, reasons: [{ code: 'rule', subjectId: 'big', text: 'Built by fixed hand rules for tests and benchmarks (generated data).' }] };
  return { revision: req.meta.revision, rails, best: plan, alternatives: [plan], infeasible: [], stats: { explored: 0, provedOptimal: false, elapsedMs: 0, cancelled: false } };
}
