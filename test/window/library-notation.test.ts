// The part library reads in engineering notation with units, and what the grid shows can be
// typed back: every numeric value of the default library, formatted as the window shows it,
// parses to the same value (to the 4 significant digits shown).
import { describe, expect, it } from 'vitest';
import { defaultLibrary } from '../../src-main/api/default-library.ts';
import { editLibraryCell, libraryView } from '../../src-main/api/library.ts';
import { libraryColumn, libraryValue } from '../../src-renderer/lib/words.ts';

describe('library values in engineering notation', () => {
  const lib = defaultLibrary();
  const view = libraryView(lib);

  it('shows a minimum on-time as nanoseconds, not 8e-8', () => {
    const col = libraryColumn('params.tonMin', 'controller');
    expect(col.label).toBe('t on min (s)');
    expect(col.hint).toBe('minimum on-time');
    expect(libraryValue(8e-8, col)).toBe('80 ns');
    for (const c of view.columns) for (const r of view.rows) {
      const shown = libraryValue(r[c.key], libraryColumn(c.key, String(r.partClass)));
      expect(shown, `${c.key} ${shown}`).not.toMatch(/\de-\d/);
    }
  });

  it('names every parameter of the default library in trade words, not as a code key', () => {
    // Headers read as a parts table does (common practice): no camel-case keys.
    expect(libraryColumn('params.rdsOn', 'switch').label).toBe('Rds(on) at 25 °C (Ω)');
    expect(libraryColumn('params.thetaJA', 'ldo').label).toBe('θJA (K/W)');
    for (const c of view.columns.filter((x) => x.key.startsWith('params.'))) {
      const label = libraryColumn(c.key).label.replace(/ \([^)]*\)$/, '');
      expect(label, c.key).not.toMatch(/[a-z][A-Z]/);
    }
  });

  it('parses every shown value back to the stored one', () => {
    let checked = 0;
    for (const c of view.columns.filter((x) => x.kind === 'number')) {
      for (const r of view.rows) {
        const v = r[c.key];
        if (typeof v !== 'number') continue;
        const shown = libraryValue(v, libraryColumn(c.key, String(r.partClass)));
        const out = libraryView(editLibraryCell(lib, String(r.id), c.key, shown)).rows.find((x) => x.id === r.id)![c.key] as number;
        expect(Math.abs(out - v), `${r.id} ${c.key}: "${shown}" → ${out}, stored ${v}`).toBeLessThanOrEqual(Math.abs(v) * 5e-4 + 1e-300);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(50);
  });
});
