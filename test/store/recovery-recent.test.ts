// Autosave/recovery copies and the recent-files list (common practice for desktop editors).
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { ProjectStore, OpenError } from '../../src-main/store/project-store.ts';
import { discardRecovery, listRecovery, restoreRecovery, writeRecovery } from '../../src-main/store/recovery.ts';
import { addRecent, clearRecent, readRecent, removeRecent, RECENT_FILE, RECENT_MAX } from '../../src-main/store/recent.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { nextId } from '../../src-main/store/ids.ts';
import { fixedClock, sha256, tempDir } from './tmp.ts';

describe('recovery', () => {
  it('writes, lists, restores and discards a working copy', () => {
    const dir = tempDir();
    const rec = join(dir, 'recovery');
    const proj = join(dir, 'p.rwproj');
    const s = ProjectStore.fromDocument(demoDocument(), { clock: fixedClock() });
    s.save(proj);
    const saved = sha256(proj);
    const req = s.getRequirements();
    req.loads[0]!.name = 'edited but not saved';
    s.setRequirements(req);
    writeRecovery(s, rec, 'win-1', new Date('2026-04-01T10:00:00Z'));
    const unsaved = ProjectStore.create();
    writeRecovery(unsaved, rec, 'win-2', new Date('2026-04-01T11:00:00Z'));
    const list = listRecovery(rec);
    expect(list.map((e) => [e.key, e.originalPath, e.writtenAt])).toEqual([
      ['win-2', null, '2026-04-01T11:00:00.000Z'],
      ['win-1', proj, '2026-04-01T10:00:00.000Z'],
    ]);
    const back = restoreRecovery(list[1]!);
    expect(back.dirty).toBe(true);
    expect(back.path).toBe(proj);
    expect(back.getRequirements().loads[0]!.name).toBe('edited but not saved');
    expect(sha256(proj)).toBe(saved); // the project file itself is untouched
    discardRecovery(rec, 'win-1');
    expect(listRecovery(rec).map((e) => e.key)).toEqual(['win-2']);
    s.close(); back.close(); unsaved.close();
  });

  it('lists nothing for a missing folder and refuses a damaged copy with OpenError', () => {
    const dir = tempDir();
    expect(listRecovery(join(dir, 'none'))).toEqual([]);
    writeRecovery(ProjectStore.create(), dir, 'x');
    const e = listRecovery(dir)[0]!;
    writeFileSync(e.file, readFileSync(e.file).subarray(0, 500));
    expect(() => restoreRecovery(e)).toThrow(OpenError);
    writeFileSync(join(dir, 'x.json'), '{not json');
    expect(listRecovery(dir)[0]!.key).toBe('x'); // still listed, with what is known
    expect(() => writeRecovery(ProjectStore.create(), dir, '../escape')).toThrow(/recovery key/);
  });
});

describe('recent files', () => {
  it('keeps absolute paths, newest first, without duplicates, at most RECENT_MAX', () => {
    const dir = tempDir();
    expect(readRecent(dir)).toEqual([]);
    for (let i = 0; i < RECENT_MAX + 3; i++) addRecent(dir, join(dir, `p${i}.rwproj`), new Date(Date.UTC(2026, 0, 1, 0, i)));
    addRecent(dir, join(dir, 'p5.rwproj'), new Date(Date.UTC(2026, 0, 2)));
    const list = readRecent(dir);
    expect(list).toHaveLength(RECENT_MAX);
    expect(list[0]).toEqual({ path: resolve(dir, 'p5.rwproj'), openedAt: '2026-01-02T00:00:00.000Z' });
    expect(list.filter((e) => e.path.endsWith('p5.rwproj'))).toHaveLength(1);
    removeRecent(dir, join(dir, 'p5.rwproj'));
    expect(readRecent(dir).some((e) => e.path.endsWith('p5.rwproj'))).toBe(false);
    clearRecent(dir);
    expect(readRecent(dir)).toEqual([]);
  });

  it('reads a damaged list as empty', () => {
    const dir = tempDir();
    writeFileSync(join(dir, RECENT_FILE), '{"files": [1, {"path": 3}, {"path": "/a", "openedAt": "t"}');
    expect(readRecent(dir)).toEqual([]);
    writeFileSync(join(dir, RECENT_FILE), '{"files": [1, {"path": 3}, {"path": "/a", "openedAt": "t"}]}');
    expect(readRecent(dir)).toEqual([{ path: '/a', openedAt: 't' }]);
  });
});

describe('ids', () => {
  it('hands out the next sequential id', () => {
    expect(nextId('load', [])).toBe('load-1');
    expect(nextId('load', ['load-1', 'load-7', 'x-9'])).toBe('load-8');
    expect(nextId('a.b', ['a.b-2', 'aXb-5'])).toBe('a.b-3');
  });
});
