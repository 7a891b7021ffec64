/**
 * A hand-made plan for the demonstration project (db/demo-project.json, an invented
 * scenario), for the roll-up arithmetic test, the benchmarks and looking at the exports
 * while the planner finds no feasible plan for the demo. The tree follows the usual
 * practice a reviewer would sketch by hand:
 *   - a 3.3 V buck from the input; 1.8 V and 1.2 V by LDO from 3.3 V;
 *   - a coupled-winding stage with the main 5 V rail as its regulated primary, a 12 V
 *     winding for the relay rail, and ±14.5 V taps into the isolated front end, each
 *     followed by an LDO to ±12 V;
 *   - a second coupled-winding stage (primary: a 5 V bus) with a 7.5 V tap into the
 *     front end: LDOs to 5 V, 3.3 V and the 4.096 V reference;
 *   - a third one (primary: a 5 V bus) with a 7.5 V tap into the fieldbus domain: LDOs to
 *     5 V and 3.3 V.
 * Every stage is designed by the stage engine's designer; a tap's band (±10 %) widens in
 * steps up to ±25 % when the designer finds no turns for it (the LDOs after it clean up). The 4.096 V reference asks ±1 %,
 * tighter than a generic LDO's ±1.5 % accuracy: it is designed for ±2 % and its window
 * honestly shows it outside ±1 %.
 */
import { designStage } from '../../src-main/engine/stages/index.ts';
import type { OutputSpec } from '../../src-main/engine/stages/types.ts';
import type { Id, Rail, Requirements } from '../../src-main/engine/model.ts';
import type { InternalNode, Plan, PlanResult, PlanStage, PlanOutput } from '../../src-main/engine/plan-types.ts';
import { groupRails, railPeakCurrent } from '../../src-main/engine/rails.ts';
import type { Amps, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';

interface StageSketch {
  id: Id;
  kind: 'buck' | 'cwbuck' | 'ldo';
  name: string;
  input: Id;
  outputs: Array<{ node: Id; role: PlanOutput['role'] }>;
  /** Tolerance to design an LDO for, when the rail asks more than an LDO holds. */
  designTolerance?: number;
}

export function demoHandPlan(req: Requirements): PlanResult {
  const rails = groupRails(req);
  const src = req.sources[0]!;
  const rail = (domain: string, v: number): Rail => {
    const r = rails.find((x) => x.domainId === domain && Math.abs(x.voltage - v) < 1e-6);
    if (!r) throw new Error(`demo has no rail ${domain} ${v}`);
    return r;
  };
  const nodes: InternalNode[] = [
    { id: 'tap:afe:+14v5', name: 'Front end tap +14.5 V', domainId: 'afe', voltage: 14.5 as Volts, kind: 'tap' },
    { id: 'tap:afe:-14v5', name: 'Front end tap -14.5 V', domainId: 'afe', voltage: -14.5 as Volts, kind: 'tap' },
    { id: 'bus:main:afe-pri', name: 'Front end primary 5V', domainId: 'main', voltage: 5 as Volts, kind: 'bus' },
    { id: 'tap:afe:7v5', name: 'Front end tap 7.5 V', domainId: 'afe', voltage: 7.5 as Volts, kind: 'tap' },
    { id: 'bus:main:bus-pri', name: 'Fieldbus primary 5V', domainId: 'main', voltage: 5 as Volts, kind: 'bus' },
    { id: 'tap:bus:7v5', name: 'Fieldbus tap 7.5 V', domainId: 'bus', voltage: 7.5 as Volts, kind: 'tap' },
  ];
  const R = {
    m12: rail('main', 12), m5: rail('main', 5), m33: rail('main', 3.3), m18: rail('main', 1.8), m12v: rail('main', 1.2),
    a12: rail('afe', 12), an12: rail('afe', -12), a5: rail('afe', 5), aRef: rail('afe', 4.096), a33: rail('afe', 3.3),
    b5: rail('bus', 5), b33: rail('bus', 3.3),
  };
  const sketch: StageSketch[] = [
    { id: 'buck-3v3', kind: 'buck', name: 'Buck 3V3', input: src.id, outputs: [{ node: R.m33.id, role: 'output' }] },
    { id: 'ldo-1v8', kind: 'ldo', name: 'LDO 1V8', input: R.m33.id, outputs: [{ node: R.m18.id, role: 'output' }] },
    { id: 'ldo-1v2', kind: 'ldo', name: 'LDO 1V2', input: R.m33.id, outputs: [{ node: R.m12v.id, role: 'output' }] },
    {
      id: 'cw-main', kind: 'cwbuck', name: 'Coupled-winding 5V main', input: src.id,
      outputs: [{ node: R.m5.id, role: 'primary' }, { node: R.m12.id, role: 'secondary' }, { node: 'tap:afe:+14v5', role: 'secondary' }, { node: 'tap:afe:-14v5', role: 'secondary' }],
    },
    { id: 'ldo-afe-12', kind: 'ldo', name: 'LDO front end +12V', input: 'tap:afe:+14v5', outputs: [{ node: R.a12.id, role: 'output' }] },
    { id: 'ldo-afe-n12', kind: 'ldo', name: 'LDO front end -12V', input: 'tap:afe:-14v5', outputs: [{ node: R.an12.id, role: 'output' }] },
    { id: 'cw-afe', kind: 'cwbuck', name: 'Coupled-winding front end', input: src.id, outputs: [{ node: 'bus:main:afe-pri', role: 'primary' }, { node: 'tap:afe:7v5', role: 'secondary' }] },
    { id: 'ldo-afe-5', kind: 'ldo', name: 'LDO front end 5V', input: 'tap:afe:7v5', outputs: [{ node: R.a5.id, role: 'output' }] },
    { id: 'ldo-afe-ref', kind: 'ldo', name: 'LDO reference 4V096', input: 'tap:afe:7v5', outputs: [{ node: R.aRef.id, role: 'output' }], designTolerance: 0.02 },
    { id: 'ldo-afe-3v3', kind: 'ldo', name: 'LDO front end 3V3', input: 'tap:afe:7v5', outputs: [{ node: R.a33.id, role: 'output' }] },
    { id: 'cw-bus', kind: 'cwbuck', name: 'Coupled-winding fieldbus', input: src.id, outputs: [{ node: 'bus:main:bus-pri', role: 'primary' }, { node: 'tap:bus:7v5', role: 'secondary' }] },
    { id: 'ldo-bus-5', kind: 'ldo', name: 'LDO fieldbus 5V', input: 'tap:bus:7v5', outputs: [{ node: R.b5.id, role: 'output' }] },
    { id: 'ldo-bus-3v3', kind: 'ldo', name: 'LDO fieldbus 3V3', input: 'tap:bus:7v5', outputs: [{ node: R.b33.id, role: 'output' }] },
  ];

  // Peak and least current of every node: its loads plus what the stages it feeds draw
  // (an LDO draws its output current plus 0.3 mA; a buck its output power / (Vin·0.8)).
  const railById = new Map(rails.map((r) => [r.id, r]));
  const nodeV = new Map<Id, number>([...rails.map((r) => [r.id, r.voltage] as const), ...nodes.map((n) => [n.id, n.voltage] as const)]);
  const peak = new Map<Id, number>();
  const least = new Map<Id, number>();
  const load = (id: Id, which: 'max' | 'min') => {
    const r = railById.get(id);
    if (!r) return 0;
    return which === 'max' ? railPeakCurrent(r) : Math.min(...Object.values(r.current));
  };
  for (let k = sketch.length - 1; k >= 0; k--) {
    const s = sketch[k]!;
    for (const o of s.outputs) {
      const downstream = sketch.filter((d) => d.input === o.node);
      const draw = (which: 'max' | 'min') => downstream.reduce((a, d) => {
        const out = d.outputs[0]!.node;
        const i = which === 'max' ? peak.get(out)! : least.get(out)!;
        return a + (d.kind === 'ldo' ? i + 3e-4 : (Math.abs(nodeV.get(out)!) * i) / (Math.abs(nodeV.get(o.node)!) * 0.8));
      }, 0);
      peak.set(o.node, load(o.node, 'max') + draw('max'));
      least.set(o.node, load(o.node, 'min') + draw('min'));
    }
  }
  const window = (id: Id): { min: number; nom: number; max: number; ripple: number } => {
    if (id === src.id) return { min: src.vMin, nom: src.vNom, max: src.vMax, ripple: 0 };
    const r = railById.get(id);
    const v = nodeV.get(id)!;
    const tol = r ? r.tolerance : 0.1;
    const lo = v - tol * Math.abs(v);
    const hi = v + tol * Math.abs(v);
    return { min: lo, nom: v, max: hi, ripple: r ? r.rippleLimit : 0.1 };
  };
  const spec = (node: Id, tolOverride?: number, tapTol = 0.1): OutputSpec => {
    const r = railById.get(node);
    return {
      nodeId: node, voltage: nodeV.get(node)! as Volts, tolerance: (tolOverride ?? (r ? r.tolerance : tapTol)) as Ratio,
      currentMin: (least.get(node) ?? 0) as Amps, currentMax: (peak.get(node) ?? 0) as Amps, rippleLimit: (r ? r.rippleLimit : 0.1) as Volts,
    };
  };
  const stages: PlanStage[] = sketch.map((s) => {
    const w = window(s.input);
    // A winding tap only feeds LDOs, so its band may widen until the designer finds turns.
    let d: ReturnType<typeof designStage> | null = null;
    for (const tapTol of [0.1, 0.15, 0.2, 0.25]) {
      d = designStage({
        kind: s.kind, vinMin: w.min as Volts, vinNom: w.nom as Volts, vinMax: w.max as Volts, vinRipple: w.ripple as Volts,
        outputs: s.outputs.map((o) => spec(o.node, s.designTolerance, tapTol)), fsw: 400e3 as Hertz,
        ambient: req.limits.ambient, tjMax: req.limits.tjMax, ceramicDerating: req.limits.ceramicDerating,
      });
      if (d.ok || s.kind !== 'cwbuck') break;
    }
    if (!d || !d.ok) throw new Error(`demo hand plan: ${s.name} refused: ${d ? d.flags.map((f) => f.text).join('; ') : 'no attempt'}`);
    const toDomains = new Set(s.outputs.map((o) => railById.get(o.node)?.domainId ?? nodes.find((n) => n.id === o.node)!.domainId));
    const barriers = [...toDomains].filter((dm) => dm !== 'main' && s.kind === 'cwbuck').map((dm) => {
      const dom = req.domains.find((x) => x.id === dm)!;
      return { fromDomainId: 'main', toDomainId: dm, isolation: dom.isolation === 'none' ? 'functional' as const : dom.isolation, workingVoltage: dom.workingVoltage };
    });
    return { id: s.id, kind: s.kind, name: s.name, inputNodeId: s.input, outputs: s.outputs.map((o) => ({ nodeId: o.node, role: o.role })), barriers, design: d.design };
  });
  const plan: Plan = {
    id: 'demo-hand', labels: ['alternative'], stages, internalNodes: nodes,
    score: { loss: 0 as never, cost: 0, parts: 0, weighted: 0 },
    reasons: [
      { code: 'hand', subjectId: 'demo-hand', text: 'Hand-made test plan for the demonstration project (invented scenario), drawn up by usual practice, not by the planner.' },
      { code: 'hand', subjectId: R.aRef.id, text: 'The 4.096 V reference asks ±1 %, tighter than a generic LDO holds (±1.5 %): its window is shown outside the tolerance.' },
    ],
  };
  return { revision: req.meta.revision, rails, best: plan, alternatives: [plan], infeasible: [], stats: { explored: 0, provedOptimal: false, elapsedMs: 0, cancelled: false } };
}
