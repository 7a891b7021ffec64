/**
 * Project store timings on a generated 200-load project:
 * - open_project_ms_200_loads: open a saved file (checks, load into memory) and read the
 *   requirements back.
 * - import_json_ms_200_loads: parse and validate the JSON document and build the project.
 * - save_project_ms_200_loads: save (serialise, temp file, fsync, rename).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Metric } from '../harness.ts';
import { timeRuns } from '../harness.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { exportProjectJson, importProjectJson } from '../../src-main/store/json-format.ts';
import { generateProject } from '../../src-main/store/generate.ts';

const RUNS = 30;

function withProjectFile<T>(fn: (path: string) => Promise<T>): Promise<T> {
  const dir = mkdtempSync(join(tmpdir(), 'rw-bench-'));
  const path = join(dir, 'bench.rwproj');
  const s = ProjectStore.fromDocument(generateProject({ loads: 200, seed: 1 }));
  s.save(path);
  s.close();
  return fn(path).finally(() => rmSync(dir, { recursive: true, force: true }));
}

export const metrics: Metric[] = [
  {
    name: 'open_project_ms_200_loads',
    unit: 'ms',
    sample: () => withProjectFile((path) => timeRuns(RUNS, () => {
      const s = ProjectStore.open(path);
      if (s.getRequirements().loads.length !== 200) throw new Error('wrong load count');
      s.close();
    }, 3)),
  },
  {
    name: 'import_json_ms_200_loads',
    unit: 'ms',
    sample: () => {
      const text = exportProjectJson(generateProject({ loads: 200, seed: 1 }));
      return timeRuns(RUNS, () => {
        const r = importProjectJson(text);
        if (!r.ok) throw new Error('import failed');
        ProjectStore.fromDocument(r.doc).close();
      }, 3);
    },
  },
  {
    name: 'save_project_ms_200_loads',
    unit: 'ms',
    sample: () => withProjectFile(async (path) => {
      const s = ProjectStore.open(path);
      try {
        return await timeRuns(RUNS, () => s.save(), 3);
      } finally {
        s.close();
      }
    }),
  },
];
