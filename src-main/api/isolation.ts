/** Barrier leakage check for the window (engine/isolation.ts); values typed in engineering notation. */
import { z } from 'zod';
import { checkBarrier, LEAKAGE_LIMITS } from '../engine/isolation.ts';
import { parseQuantity } from '../engine/notation.ts';
import type { QuantityKind } from '../engine/units.ts';
import { ApiFailure, handler, noArgs } from './registry.ts';

function read(text: string, kind: QuantityKind, field: string, label: string): number {
  const r = parseQuantity(text, kind, label);
  if (!r.ok) throw new ApiFailure(r.message, field);
  if (r.value < 0) throw new ApiFailure(`${label}: must not be negative`, field);
  return r.value;
}

export const isolationHandlers = {
  'isolation.limits': handler('isolation.limits', noArgs, () => LEAKAGE_LIMITS.map((l) => ({ ...l }))),
  'isolation.check': handler('isolation.check', z.object({
    capacitance: z.string().max(64), voltageRms: z.string().max(64), frequency: z.string().max(64), limitId: z.string().min(1).max(64),
  }).strict(), (_s, a) => {
    const capacitance = read(a.capacitance, 'capacitance', 'capacitance', 'Y capacitance');
    const voltageRms = read(a.voltageRms, 'voltage', 'voltageRms', 'voltage across the barrier');
    const frequency = read(a.frequency, 'frequency', 'frequency', 'frequency');
    if (!LEAKAGE_LIMITS.some((l) => l.id === a.limitId)) throw new ApiFailure(`limitId: "${a.limitId}" is not a known limit`, 'limitId');
    const c = checkBarrier({ capacitance, voltageRms, frequency, limitId: a.limitId });
    return { ...c, limit: { ...c.limit }, cautions: [...c.cautions] };
  }),
};
