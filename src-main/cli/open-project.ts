/** Opening a project file for a CLI command: a missing path or a refused file is one line. */
import { OpenError, ProjectStore } from '../store/project-store.ts';
import { CliError } from './command.ts';

export function openStore(path: string | undefined): ProjectStore {
  if (!path) throw new CliError('missing project file (see --help)', 2);
  try {
    return ProjectStore.open(path);
  } catch (e) {
    if (e instanceof OpenError) throw new CliError(e.message);
    throw e;
  }
}
