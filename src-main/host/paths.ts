/**
 * Paths that come from the window are never used as given: they are checked for type and
 * length, normalised to absolute form, must carry the expected extension, and must resolve
 * (after following symbolic links of the parent folder) inside one of the allowed folders.
 * Writes never replace something that is not a regular file.
 */
import { existsSync, lstatSync, realpathSync } from 'node:fs';
import { dirname, isAbsolute, resolve, sep, basename } from 'node:path';
import { ApiFailure } from '../api/registry.ts';
import type { PathPolicy } from '../api/session.ts';

export interface PathRules {
  /** Folders inside which the window may read and write. */
  allowedRoots: string[];
  /** Relative paths resolve against this folder. */
  baseDir: string;
}

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

export function makePathPolicy(rules: PathRules): PathPolicy {
  const roots = rules.allowedRoots.map((r) => realDir(resolve(r)) ?? resolve(r));
  return (raw, purpose, ext) => {
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
    if (!roots.some((r) => inside(full, r))) {
      throw new ApiFailure(`path: ${full} is outside the folders this window may use (${roots.join(', ')})`, 'path');
    }
    if (existsSync(full)) {
      const st = lstatSync(full);
      if (!st.isFile()) throw new ApiFailure(`path: ${full} is not a regular file`, 'path');
    } else if (purpose === 'open-project') {
      throw new ApiFailure(`path: ${full} does not exist`, 'path');
    }
    return full;
  };
}
