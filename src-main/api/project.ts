/**
 * Project handlers: the snapshot the window starts from, new, rename. Opening, saving and
 * importing go through the project store (see files.ts).
 */
import { z } from 'zod';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Requirements } from '../engine/model.ts';
import type { Ratio, Volts, Amps } from '../engine/units.ts';
import { ApiFailure, handler, noArgs } from './registry.ts';
import { clone, type Session } from './session.ts';
import { buildSnapshot } from './snapshot.ts';
import { checkText } from '../engine/text-rules.ts';

/** A new project: one source, one domain, one mode, no loads. */
export function blankRequirements(): Requirements {
  return {
    meta: { name: 'Untitled project', description: '', revision: 1 },
    sources: [{ id: 'src1', name: 'Input', vNom: 24 as Volts, vMin: 18 as Volts, vMax: 30 as Volts, currentLimit: 2 as Amps }],
    domains: [{ id: 'dom1', name: 'Main', isolation: 'none', workingVoltage: 0 as Volts }],
    modes: [{ id: 'mode1', name: 'Run', share: 1 as Ratio }],
    loads: [],
    limits: clone(DEFAULT_LIMITS),
    preferences: clone(DEFAULT_PREFERENCES),
  };
}

/** Refuse to drop unsaved work unless the window said so (it asks the user first). */
export function guardDiscard(s: Session, discard: boolean | undefined): void {
  if (s.dirty && !discard) throw new ApiFailure('the project has unsaved changes: save it first or confirm discarding them', 'discard');
}

export const projectHandlers = {
  'project.snapshot': handler('project.snapshot', noArgs, (s: Session) => buildSnapshot(s)),
  'project.rename': handler('project.rename', z.object({ name: z.string().trim().min(1, 'the project needs a name').max(500) }).strict(), (s: Session, a) => {
    const bad = checkText(a.name, 'name');
    if (bad) throw new ApiFailure(`project name: ${bad}`, 'name');
    s.edit('Rename the project', (req) => { req.meta.name = a.name; });
    return buildSnapshot(s);
  }),
  'project.describe': handler('project.describe', z.object({ description: z.string().max(100_000) }).strict(), (s: Session, a) => {
    const bad = checkText(a.description, 'description');
    if (bad) throw new ApiFailure(`project description: ${bad}`, 'description');
    s.edit('Change the project description', (req) => { req.meta.description = a.description.trim(); });
    return buildSnapshot(s);
  }),
};
