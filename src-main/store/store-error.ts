import type { Problem } from '../engine/validate.ts';

/** Bad input to the store (wrong shape, no file name) or a failed save: nothing was changed. */
export class StoreError extends Error {
  constructor(message: string, readonly problems: Problem[] = []) {
    super(problems.length ? `${message}: ${problems.map((p) => `${p.path}: ${p.message}`).join('; ')}` : message);
    this.name = 'StoreError';
  }
}
