/**
 * The project states the kill test saves: state k differs from every other state in its
 * name, its revision and every load's currents, so a file holding pages of two states
 * would not hash as either.
 */
import { createHash } from 'node:crypto';
import { canonicalJson } from '../../src-main/store/project-store.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import type { Amps } from '../../src-main/engine/units.ts';

export function killStates(loads: number): (k: number) => Requirements {
  const base = generateProject({ loads, seed: 11 }).requirements;
  return (k) => {
    const r = structuredClone(base);
    r.meta.name = `kill state ${k}`;
    r.meta.revision = k;
    r.loads.forEach((l, i) => {
      for (const m of Object.keys(l.current)) l.current[m] = (Math.round(l.current[m]! * (1 + ((k * 31 + i) % 97) / 100) * 1e6) / 1e6) as Amps;
    });
    return r;
  };
}

/** Content hash of requirements (key order does not matter). */
export function requirementsHash(r: Requirements): string {
  return createHash('sha256').update(canonicalJson(r)).digest('hex');
}
