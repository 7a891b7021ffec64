/**
 * Designs for the hand-made plan (hand-plan.ts), made with the stage engine's own designer
 * from stage specs derived from the invented requirements.
 */
import { designStage, type StageDesign } from '../../src-main/engine/stages/index.ts';
import type { StageSpec, OutputSpec } from '../../src-main/engine/stages/types.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { PlanResult } from '../../src-main/engine/plan-types.ts';
import { railPeakCurrent } from '../../src-main/engine/rails.ts';
import type { Amps, Hertz, Ratio, Volts } from '../../src-main/engine/units.ts';
import { handPlan } from './hand-plan.ts';

function out(nodeId: string, v: number, tol: number, imin: number, imax: number, ripple: number): OutputSpec {
  return { nodeId, voltage: v as Volts, tolerance: tol as Ratio, currentMin: imin as Amps, currentMax: imax as Amps, rippleLimit: ripple as Volts };
}

function must(spec: StageSpec): StageDesign {
  const r = designStage(spec);
  if (!r.ok) throw new Error(`designer refused ${spec.kind}: ${r.flags.map((f) => f.text).join('; ')}`);
  return r.design;
}

/** The hand plan with every stage designed by the stage engine. */
export function designedHandPlan(req: Requirements): PlanResult {
  const bare = handPlan(req);
  const rails = bare.rails;
  const rail = (id: string) => rails.find((r) => r.id === id)!;
  const minI = (id: string) => Math.min(...Object.values(rail(id).current));
  const s = req.sources[0]!;
  const base = { vinMin: s.vMin, vinNom: s.vNom, vinMax: s.vMax, fsw: 400e3 as Hertz, ambient: req.limits.ambient, tjMax: req.limits.tjMax, ceramicDerating: req.limits.ceramicDerating };
  const stages = bare.best!.stages;
  const [buck, cw, ldo] = stages as [typeof stages[0], typeof stages[0], typeof stages[0]];
  const ro = (id: string) => { const r = rail(id); return out(id, r.voltage, r.tolerance, minI(id), railPeakCurrent(r), r.rippleLimit); };
  const ldoOut = ro(ldo.outputs[0]!.nodeId);
  const designs: Record<string, StageDesign> = {
    [buck.id]: must({ kind: 'buck', ...base, outputs: [ro(buck.outputs[0]!.nodeId)] }),
    [cw.id]: (() => {
      // The tap only feeds the LDO: its band widens step by step if the designer finds no turns.
      let last: Error | null = null;
      for (const tapTol of [0.1, 0.15, 0.2]) {
        try {
          return must({
            kind: 'cwbuck', ...base,
            outputs: [
              ro(cw.outputs[0]!.nodeId), ro(cw.outputs[1]!.nodeId), ro(cw.outputs[2]!.nodeId),
              // The tap feeds the LDO: its current is the LDO's input current (≈ its output current).
              out('tap:sense:6v5', 6.5, tapTol, ldoOut.currentMin, (ldoOut.currentMax as number) + 0.001, 0.2),
            ],
          });
        } catch (e) { last = e as Error; }
      }
      throw last!;
    })(),
    [ldo.id]: must({ kind: 'ldo', vinMin: 5.85 as Volts, vinNom: 6.5 as Volts, vinMax: 7.15 as Volts, vinRipple: 0.05 as Volts, outputs: [ldoOut], fsw: 400e3 as Hertz, ambient: req.limits.ambient, tjMax: req.limits.tjMax, ceramicDerating: req.limits.ceramicDerating }),
  };
  return handPlan(req, designs);
}
