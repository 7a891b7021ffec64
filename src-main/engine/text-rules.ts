/**
 * The one rule for text people type (names, ids, rail keys, descriptions) and the one way
 * such text is shown where a character could do harm. Pure.
 *
 * A name is printable Unicode on one line: no C0 or C1 control character (U+0000–001F,
 * U+007F–009F, which includes tab, CR, LF and NEL), no line or paragraph separator
 * (U+2028, U+2029), no bidirectional formatting character (U+061C, U+200E, U+200F,
 * U+202A–202E, U+2066–2069), no unpaired surrogate and no noncharacter (U+FDD0–FDEF and
 * every code point ending in FFFE or FFFF), and at most NAME_MAX_LENGTH code points.
 * A description follows the same rule but may hold line feeds and tabs and be up to
 * DESCRIPTION_MAX_LENGTH code points long.
 *
 * `checkText` says what is wrong (the caller adds the field); `showText` turns any text into
 * one harmless line with every such character written as `\u{1B}`, for terminals, netlist
 * comments and drawings. Writers use it whatever validation said: a file from elsewhere is
 * never trusted to have passed it.
 */

export type TextKind = 'name' | 'description';

/** Longest name, id or rail key, in code points. */
export const NAME_MAX_LENGTH = 200;
/** Longest project description, in code points. */
export const DESCRIPTION_MAX_LENGTH = 20_000;

const BIDI = new Set([0x061c, 0x200e, 0x200f, 0x202a, 0x202b, 0x202c, 0x202d, 0x202e, 0x2066, 0x2067, 0x2068, 0x2069]);
const LINE_BREAKS = new Set([0x0a, 0x0b, 0x0c, 0x0d, 0x85, 0x2028, 0x2029]);

/** Matches every string holding a forbidden character (and some that do not). */
const MAYBE_FORBIDDEN = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028-\u202e\u2066-\u2069\ud800-\udfff\ufdd0-\ufdef\ufffe\uffff]/;

/** What kind of forbidden character a code point is, or null when it is allowed in a name. */
export function forbiddenKind(cp: number): string | null {
  if (LINE_BREAKS.has(cp)) return 'a line break';
  if (cp <= 0x1f || (cp >= 0x7f && cp <= 0x9f)) return 'a control character';
  if (BIDI.has(cp)) return 'a bidirectional formatting character';
  if (cp >= 0xd800 && cp <= 0xdfff) return 'an unpaired surrogate';
  if ((cp >= 0xfdd0 && cp <= 0xfdef) || (cp & 0xfffe) === 0xfffe) return 'a noncharacter';
  return null;
}

/** `U+001B` */
export function codePointLabel(cp: number): string {
  return `U+${cp.toString(16).toUpperCase().padStart(4, '0')}`;
}

/**
 * Why `text` breaks the rule for its kind, as a phrase the caller prefixes with the field
 * ("loads[3].name: contains a control character (U+001B) at character 5; …"), or null.
 */
export function checkText(text: string, kind: TextKind = 'name'): string | null {
  const max = kind === 'name' ? NAME_MAX_LENGTH : DESCRIPTION_MAX_LENGTH;
  const what = kind === 'name' ? 'a name' : 'a description';
  let n = 0;
  for (const ch of text) {
    n++;
    const cp = ch.codePointAt(0)!;
    if (kind === 'description' && (cp === 0x0a || cp === 0x09)) continue;
    const bad = forbiddenKind(cp);
    if (bad) {
      return `contains ${bad} (${codePointLabel(cp)}) at character ${n}; ${what} must be printable text${kind === 'name' ? ' on one line' : ''}, without control or bidirectional formatting characters`;
    }
  }
  if (n > max) return `is ${n} characters long; ${what} may have at most ${max}`;
  return null;
}

/** The breach of the rule in one field as a validation problem `{ path, message }`, or null. */
export function textProblem(path: string, text: unknown, kind: TextKind = 'name'): { path: string; message: string } | null {
  if (typeof text !== 'string') return null;
  const m = checkText(text, kind);
  return m ? { path, message: m } : null;
}

/**
 * Any text as one harmless line: each character a name may not hold (see `forbiddenKind`)
 * is written as `\u{1B}`. With `keepLineFeeds`, line feeds and tabs stay (for whole
 * messages whose lines the program itself broke); everything else is still escaped.
 */
export function showText(text: string, opts: { keepLineFeeds?: boolean } = {}): string {
  // Fast path for the usual text (astral characters take the slow path, which is exact).
  if (!MAYBE_FORBIDDEN.test(text)) return text;
  let out = '';
  let changed = false;
  for (const ch of text) {
    const cp = ch.codePointAt(0)!;
    if (opts.keepLineFeeds && (cp === 0x0a || cp === 0x09)) { out += ch; continue; }
    if (forbiddenKind(cp) !== null) {
      out += `\\u{${cp.toString(16).toUpperCase()}}`;
      changed = true;
    } else {
      out += ch;
    }
  }
  return changed ? out : text;
}
