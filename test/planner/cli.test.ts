/** `railwright plan`: prints the tree with reasons, saves the result with its revision, refuses bad input. */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src-main/cli.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { randomRequirements } from '../../src-main/engine/planner/instances.ts';

function io() {
  const out: string[] = [], err: string[] = [];
  return { out, err, io: { out: (l: string) => out.push(l), err: (l: string) => err.push(l) } };
}

function makeProject(dir: string): string {
  const path = join(dir, 'small.rwproj');
  const req = randomRequirements({ rails: 4, seed: 3, maxSecondaries: 2, quietShare: 0, isolatedShare: 0.5 });
  const store = ProjectStore.fromDocument({ requirements: req });
  store.save(path);
  store.close();
  return path;
}

describe('railwright plan', () => {
  it('plans, prints the tree and reasons, and saves the plan with the requirements revision', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rw-plan-'));
    try {
      const path = makeProject(dir);
      const c = io();
      const code = await runCli(['plan', path, '--objective', 'loss'], c.io);
      // A project without its own part library is designed with the default library, and says so.
      expect(c.err.filter((l) => !l.startsWith('note: the project has no part library'))).toEqual([]);
      expect(c.err.join('\n')).toMatch(/using the default library/);
      const text = c.out.join('\n');
      expect(code).toBe(0);
      expect(text).toMatch(/Reasons:/);
      expect(text).toMatch(/lowest-loss/);
      // Isolated domains in the plan: the barrier and the safety caution are printed.
      expect(text).toMatch(/barrier: (basic|functional)/);
      expect(text).toMatch(/Caution: isolation barriers/);
      // The claim names the space it holds over; "Proved optimal" only with the proof.
      expect(text).toMatch(/^(Proved optimal;|Best found, not proved optimal \(.+\);)/m);
      expect(text).toMatch(/^(Proved over|Searched): \d+ rails; feeds: /m);
      const store = ProjectStore.open(path);
      const saved = store.getPlanResult()!;
      expect(saved).not.toBeNull();
      expect(saved.stale).toBe(false);
      expect(saved.result.revision).toBe(store.getRequirements().meta.revision);
      // A change to the requirements makes the saved plan stale.
      const req = store.getRequirements();
      req.loads[0]!.tolerance = 0.04 as never;
      store.setRequirements(req);
      expect(store.getPlanResult()!.stale).toBe(true);
      store.close();
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 180_000);

  it('prints the PlanResult as JSON with --json', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rw-plan-'));
    try {
      const path = makeProject(dir);
      const c = io();
      await runCli(['plan', path, '--json', '--budget-ms', '60000'], c.io);
      const parsed = JSON.parse(c.out.join('\n')) as { rails: unknown[]; stats: { provedOptimal: boolean; notProved?: string; space?: { summary: string; candidates: number; designed: number } } };
      expect(parsed.rails.length).toBe(4);
      expect(typeof parsed.stats.provedOptimal).toBe('boolean');
      expect(parsed.stats.space?.summary).toMatch(/4 rails; feeds: /);
      expect(parsed.stats.provedOptimal).toBe(parsed.stats.notProved === undefined);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 180_000);

  it('refuses bad options and missing files with one clear line, leaving the file untouched', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rw-plan-'));
    try {
      const path = makeProject(dir);
      const before = readFileSync(path);
      for (const [args, field] of [
        [['plan', path, '--objective', 'speed'], '--objective'],
        [['plan', path, '--budget-ms', '-5'], '--budget-ms'],
        [['plan', path, '--budget-ms', 'soon'], '--budget-ms'],
      ] as const) {
        const c = io();
        expect(await runCli([...args], c.io)).toBe(2);
        expect(c.err.join('\n')).toContain(field);
      }
      expect(readFileSync(path).equals(before)).toBe(true);
      const c = io();
      expect(await runCli(['plan', join(dir, 'missing.rwproj')], c.io)).toBe(1);
      expect(c.err.length).toBe(1);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
