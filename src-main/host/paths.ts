/**
 * Paths that come from the window are never used as given: they are checked for type and
 * length, normalised to absolute form, must carry the expected extension, and must resolve
 * (after following symbolic links of the parent folder) inside one of the allowed folders.
 * Writes never replace something that is not a regular file.
 *
 * The local web host adds two rules (the page is the only thing between a request and the
 * user's files, with no native dialog to prove a choice):
 * - `refuseHidden`: no folder or file below the allowed folder whose name starts with a
 *   dot (settings, keys and caches live there: ~/.ssh, ~/.config);
 * - a per-run allow-list: `allowedRoots` at first (the projects folder, the folder of the
 *   project opened at start), plus each folder the user picks for Open or Save as inside
 *   `chooseRoots` (home, the temporary folder). Exports go only into allowed folders.
 */
import { existsSync, lstatSync, realpathSync } from 'node:fs';
import { dirname, isAbsolute, relative, resolve, sep, basename } from 'node:path';
import { ApiFailure } from '../api/registry.ts';
import type { PathPolicy } from '../api/session.ts';

export interface PathRules {
  /** Folders inside which the window may read and write. */
  allowedRoots: string[];
  /** Relative paths resolve against this folder. */
  baseDir: string;
  /** Refuse every path with a hidden (dot) folder or file below its allowed folder. */
  refuseHidden?: boolean;
  /**
   * Folders inside which Open and Save as may pick a project file; the folder picked then
   * joins the allowed folders for this run (so the exports may go there too).
   */
  chooseRoots?: string[];
}

/** A path policy that can also be told about folders the user chose, and list them. */
export type AllowListPolicy = PathPolicy & {
  /** Allow a folder for the rest of this run (e.g. the folder of the project opened at start). */
  allowFolder(dir: string): void;
  /** The folders currently allowed, real paths. */
  folders(): string[];
};

function realDir(dir: string): string | null {
  try {
    return realpathSync(dir);
  } catch {
    return null;
  }
}

function inside(child: string, root: string): boolean {
  const r = root.endsWith(sep) ? root : root + sep;
  return child === root || child.startsWith(r);
}

/** The first hidden name of `full` below `root`, or null. */
function hiddenPart(full: string, root: string): string | null {
  const rel = relative(root, full);
  return rel.split(sep).find((part) => part.startsWith('.') && part !== '.' && part !== '..') ?? null;
}

export function makePathPolicy(rules: PathRules): AllowListPolicy {
  const real = (r: string) => realDir(resolve(r)) ?? resolve(r);
  const roots = rules.allowedRoots.map(real);
  const chooseRoots = (rules.chooseRoots ?? []).map(real);
  const policy = ((raw, purpose, ext) => {
    if (typeof raw !== 'string' || raw.trim() === '') throw new ApiFailure('path: empty', 'path');
    if (raw.length > 1024) throw new ApiFailure('path: longer than 1024 characters', 'path');
    if (raw.includes('\0')) throw new ApiFailure('path: contains a NUL character', 'path');
    const abs = resolve(isAbsolute(raw) ? raw : resolve(rules.baseDir, raw));
    const name = basename(abs);
    if (!name.toLowerCase().endsWith(ext.toLowerCase())) {
      throw new ApiFailure(`path: "${name}" must end in ${ext}`, 'path');
    }
    if (name.startsWith('.')) throw new ApiFailure(`path: "${name}" is a hidden file name`, 'path');
    const parent = realDir(dirname(abs));
    if (!parent) throw new ApiFailure(`path: the folder ${dirname(abs)} does not exist`, 'path');
    const full = resolve(parent, name);
    const hiddenRefusal = (root: string) => {
      const h = rules.refuseHidden ? hiddenPart(full, root) : null;
      if (h) {
        throw new ApiFailure(`path: ${full} is refused: "${h}" is a hidden folder (its name starts with a dot), and hidden folders hold settings and keys that the window never reads or writes`, 'path');
      }
    };
    const root = roots.find((r) => inside(full, r));
    if (root) {
      hiddenRefusal(root);
    } else {
      const pickRoot = chooseRoots.find((r) => inside(full, r));
      if (pickRoot) hiddenRefusal(pickRoot);
      if (pickRoot && purpose === 'export') {
        throw new ApiFailure(`path: ${full} is refused: exports go only into the project's folder or a folder chosen with Open or Save as in this window (${roots.join(', ')})`, 'path');
      }
      if (!pickRoot) throw new ApiFailure(`path: ${full} is outside the folders this window may use (${[...roots, ...chooseRoots].join(', ')})`, 'path');
    }
    if (existsSync(full)) {
      const st = lstatSync(full);
      if (!st.isFile()) throw new ApiFailure(`path: ${full} is not a regular file`, 'path');
    } else if (purpose === 'open-project') {
      throw new ApiFailure(`path: ${full} does not exist`, 'path');
    }
    // Open or Save as picked this folder: it is allowed for the rest of the run.
    if (!root) roots.push(parent);
    return full;
  }) as AllowListPolicy;
  policy.allowFolder = (dir: string) => {
    const r = real(dir);
    if (!roots.some((x) => x === r)) roots.push(r);
  };
  policy.folders = () => [...roots];
  return policy;
}
