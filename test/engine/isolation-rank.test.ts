// The one ranking of isolation classes (engine/model.ts isolationRank). Order: functional
// insulation gives no protection against shock, basic gives one level, reinforced the
// equivalent of double insulation (terms as in IEC 60664-1, from memory; common practice).
// The part library writes a barrier's class as a number, 0 functional, 1 basic, 2 reinforced
// (engine/library.ts CLASS_PARAMS).
import { describe, expect, it } from 'vitest';
import { ISOLATION_CLASSES, isolationRank } from '../../src-main/engine/model.ts';
import { strictest } from '../../src-main/engine/isolation.ts';
import { CLASS_PARAMS } from '../../src-main/engine/library.ts';

describe('isolationRank', () => {
  it('orders none < functional < basic < reinforced, as the library numbers them', () => {
    expect(['none', 'functional', 'basic', 'reinforced'].map(isolationRank)).toEqual([-1, 0, 1, 2]);
    const hint = CLASS_PARAMS['iso-module'].find((p) => p.key === 'isolation')!;
    expect(JSON.stringify(hint)).toContain('0 functional, 1 basic, 2 reinforced');
  });
  it('ranks text that names no class as none', () => {
    expect([isolationRank(undefined), isolationRank(null), isolationRank('double')]).toEqual([-1, -1, -1]);
  });
  it('strictest picks the higher class of every pair', () => {
    for (const a of ISOLATION_CLASSES) for (const b of ISOLATION_CLASSES) {
      expect(strictest(a, b)).toBe(isolationRank(a) >= isolationRank(b) ? a : b);
      expect(isolationRank(strictest(a, b))).toBe(Math.max(isolationRank(a), isolationRank(b)));
    }
  });
});
