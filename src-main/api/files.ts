/** Project file handlers: new, open, open the demo, save, import. */
import { z } from 'zod';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import { buildSnapshot } from './snapshot.ts';
import { blankRequirements, guardDiscard } from './project.ts';

const discard = z.boolean().optional();

export const fileHandlers = {
  'project.new': handler('project.new', z.object({ discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    s.replace({ requirements: blankRequirements(), library: s.library, planResult: null, path: null, store: null });
    return buildSnapshot(s);
  }),
  'project.open': handler('project.open', z.object({ path: z.string().min(1).max(1024), discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    throw new ApiFailure('path: opening project files is not part of this build yet', 'path');
  }),
  'project.openDemo': handler('project.openDemo', z.object({ discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    throw new ApiFailure('the demo project is not part of this build yet');
  }),
  'project.save': handler('project.save', z.object({ path: z.string().min(1).max(1024).optional() }).strict(), (_s: Session) => {
    throw new ApiFailure('saving is not part of this build yet');
  }),
  'project.importJson': handler('project.importJson', z.object({ text: z.string().max(16_000_000), discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    throw new ApiFailure('text: JSON import is not part of this build yet', 'text');
  }),
};
