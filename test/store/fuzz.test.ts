// Robustness: no input may crash, corrupt a file or hang (DESIGN.md §7). Property tests
// with fast-check (an npm library) feed random JSON and randomly damaged project files.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { OpenError, ProjectStore } from '../../src-main/store/project-store.ts';
import { exportProjectValue, importProjectJson, importProjectValue } from '../../src-main/store/json-format.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { sha256, tempDir } from './tmp.ts';

describe('import never throws', () => {
  it('on arbitrary JSON values', () => {
    fc.assert(fc.property(fc.jsonValue(), (v) => {
      const r = importProjectValue(v);
      return r.ok || (r.problems.length > 0 && r.problems.every((p) => typeof p.path === 'string' && p.message.length > 0));
    }), { numRuns: 300 });
  });

  it('on the demo with one field replaced by an arbitrary value', () => {
    const base = exportProjectValue(demoDocument());
    const paths: (string | number)[][] = [];
    const walk = (x: unknown, path: (string | number)[]) => {
      if (x && typeof x === 'object') {
        for (const [k, v] of Object.entries(x)) walk(v, [...path, Array.isArray(x) ? Number(k) : k]);
      } else paths.push(path);
    };
    walk(base, []);
    fc.assert(fc.property(fc.constantFrom(...paths), fc.jsonValue(), (path, value) => {
      const doc = structuredClone(base) as Record<string, unknown>;
      let o: Record<string | number, unknown> = doc;
      for (const k of path.slice(0, -1)) o = o[k] as Record<string | number, unknown>;
      o[path.at(-1)!] = value;
      const r = importProjectJson(JSON.stringify(doc));
      if (r.ok) return true;
      return r.problems.length > 0 && r.problems.every((p) => p.message.length > 0);
    }), { numRuns: 400 });
  });
});

describe('a damaged project file', () => {
  it('either opens or is refused with OpenError, and is never modified', () => {
    const dir = tempDir();
    const good = join(dir, 'good.rwproj');
    const s = ProjectStore.fromDocument(demoDocument());
    s.save(good);
    s.close();
    const bytes = readFileSync(good);
    let refused = 0;
    fc.assert(fc.property(
      fc.array(fc.record({ at: fc.oneof(fc.nat({ max: 99 }), fc.nat({ max: 4095 }), fc.nat({ max: bytes.length - 1 })), value: fc.integer({ min: 0, max: 255 }) }), { minLength: 1, maxLength: 20 }),
      (flips) => {
        const b = Buffer.from(bytes);
        for (const f of flips) b[f.at] = f.value;
        const p = join(dir, 'damaged.rwproj');
        writeFileSync(p, b);
        const h = sha256(p);
        try {
          const t = ProjectStore.open(p);
          t.getRequirements();
          t.close();
        } catch (e) {
          if (!(e instanceof OpenError)) throw e;
          refused++;
        }
        return sha256(p) === h;
      }), { numRuns: 300 });
    expect(refused).toBeGreaterThan(0);
  });
});
