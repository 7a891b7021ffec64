/** Temporary folders for store tests, removed after each test file. */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';

const made: string[] = [];

export function tempDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'rw-store-'));
  made.push(d);
  return d;
}

afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

export function sha256(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex');
}

/** A fixed clock that advances one second per call (deterministic times). */
export function fixedClock(start = '2026-03-01T12:00:00.000Z'): () => Date {
  let t = Date.parse(start);
  return () => new Date((t += 1000) - 1000);
}
