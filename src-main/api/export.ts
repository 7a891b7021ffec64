/** Export handler: every export format through one request. */
import { z } from 'zod';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import type { ExportFile } from './contract.ts';

const kinds = z.enum(['bom-csv', 'bom-xlsx', 'tree-svg', 'tree-pdf', 'report', 'json', 'spice', 'magnetics']);

export const exportHandlers = {
  'export.file': handler('export.file', z.object({ kind: kinds, path: z.string().max(1024).optional(), stageId: z.string().max(200).optional() }).strict(),
    async (_s: Session, a): Promise<ExportFile> => {
      throw new ApiFailure(`${a.kind}: this export is not part of this build yet`, 'kind');
    }),
};
