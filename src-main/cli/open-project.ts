/** Opening a project file for a CLI command: a missing path or a refused file is one line. */
import { OpenError, ProjectStore } from '../store/project-store.ts';
import { CliError, type CliIo } from './command.ts';
import type { TypedLibraryRow } from '../api/cli-shared.ts';
import { typedLibrary } from '../api/figures.ts';
import { defaultLibrary } from '../api/default-library.ts';

export function openStore(path: string | undefined): ProjectStore {
  if (!path) throw new CliError('missing project file (see --help)', 2);
  try {
    return ProjectStore.open(path);
  } catch (e) {
    if (e instanceof OpenError) throw new CliError(e.message);
    throw e;
  }
}

/** The project's library as typed rows; the default library when the project has none. */
export function projectLibrary(store: ProjectStore, io: CliIo): TypedLibraryRow[] {
  const stored = store.getLibrary();
  const rows = stored.length ? stored : defaultLibrary();
  if (!stored.length) io.err('note: the project has no part library yet; using the default library (invented cost estimates)');
  const r = typedLibrary(rows);
  if (!r.ok) throw new CliError(`the project's part library has problems: ${r.problems.slice(0, 5).join('; ')}`);
  return r.rows;
}

