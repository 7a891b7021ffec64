// Speed work must not move any result: the demo's candidate stages, designed again, give
// bit-for-bit the designs, reasons, flags, full-load corners and windows recorded before the
// optimisations (fixture and how it was made: test/helpers/stage-design-identity.ts). This
// is a regression check of our own code against its earlier output, not an engineering
// check; the engineering sources are in the kind tests beside it.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { designHash, type IdentityFixture } from '../../helpers/stage-design-identity.ts';

const fixture = JSON.parse(readFileSync(join(import.meta.dirname, '../../fixtures/stage-design-identity.json'), 'utf8')) as IdentityFixture;

describe('stage designs of the demo candidates are unchanged by the speed work', () => {
  it('covers coupled-winding stages with and without the library, and the other kinds', () => {
    const kinds = new Set(fixture.entries.map((e) => `${e.spec.kind}${e.library ? '+library' : ''}`));
    expect(kinds.has('cwbuck')).toBe(true);
    expect(kinds.has('cwbuck+library')).toBe(true);
    expect(kinds.size).toBeGreaterThanOrEqual(6);
    expect(fixture.entries.filter((e) => e.corners).length).toBeGreaterThan(100);
  });
  it('every design hashes as recorded', () => {
    const differ: string[] = [];
    fixture.entries.forEach((e, i) => {
      if (designHash(e, fixture.libraryRows, fixture.ambient) !== fixture.hashes[i]) {
        differ.push(`#${i} ${e.spec.kind}${e.library ? ' (library)' : ''} ${e.spec.outputs.map((o) => o.nodeId).join('+')} ${e.spec.vinMin}…${e.spec.vinMax} V`);
      }
    });
    expect(differ).toEqual([]);
  }, 120_000);
});

describe('the remembered part choice', () => {
  const need = { vinMin: 18, vinMax: 32, iNeed: 1.2, ipk: 1.4, forcedPwm: true };
  it('gives what a fresh choice over the same rows gives, and a changed library chooses again', async () => {
    const { chooseSwitcher, chooseRectifier } = await import('../../../src-main/engine/stages/part-choice.ts');
    const lib = fixture.libraryRows;
    const first = chooseSwitcher(lib, need);
    // A copy of the rows is another library to the memo: chosen from scratch.
    expect(JSON.stringify(chooseSwitcher([...lib], need))).toBe(JSON.stringify(first));
    expect(chooseSwitcher(lib, need)).toBe(first);
    if ('problem' in first) throw new Error('the fixture library has a controller for this need');
    // Without the chosen controller the cheapest remaining one is picked, not the remembered one.
    const chosen = new Set(first.refs.map((r) => r.libraryId));
    const without = lib.filter((r) => !(r.partClass === 'controller' && chosen.has(r.id)));
    const other = chooseSwitcher(without, need);
    expect('problem' in other || other.refs.some((r) => !chosen.has(r.libraryId))).toBe(true);
    const rect = chooseRectifier(lib, 60, 0.2, 'rectifier, winding 1', { ambient: 60, tjMax: 125 });
    expect(JSON.stringify(chooseRectifier([...lib], 60, 0.2, 'rectifier, winding 1', { ambient: 60, tjMax: 125 }))).toBe(JSON.stringify(rect));
    // Another thermal limit is another question.
    const hot = chooseRectifier(lib, 60, 0.2, 'rectifier, winding 1', { ambient: 120, tjMax: 125 });
    expect(JSON.stringify(hot)).toBe(JSON.stringify(chooseRectifier([...lib], 60, 0.2, 'rectifier, winding 1', { ambient: 120, tjMax: 125 })));
  });
});
