/**
 * Engineering notation at the edges: parse what an engineer types (`3V3`, `250m`, `4u7`,
 * `2.2uH`, `10 kΩ`, `±5%`) into base SI numbers, and format SI numbers back with SI
 * prefixes. Pure: the window, the CLI and the JSON importer all call these.
 *
 * Accepted forms of a quantity (spaces between the parts are allowed):
 *   plain number           `3.3`, `-12`, `1e-3`, `.5`
 *   number + prefix        `250m`, `470n`, `10k`, `1M`, `1meg`
 *   number + prefix + unit `250mA`, `4.7µF`, `2.2uH`, `100 kHz`, `10 kΩ`
 *   letter as decimal mark `3V3`, `1V8`, `4u7`, `1k5`, `2R2`, `R47`, `4u7F` (the "RKM" style)
 * Prefixes: f p n u µ m k K M G, and `meg` for mega. `m` is milli, `M` and `meg` are mega.
 */
import { UNIT_SYMBOL, type QuantityKind } from './units.ts';

export type ParseResult = { ok: true; value: number } | { ok: false; message: string };

const PREFIX_EXP: Record<string, number> = {
  f: -15, p: -12, n: -9, u: -6, 'µ': -6, 'μ': -6, m: -3, k: 3, K: 3, M: 6, meg: 6, MEG: 6, Meg: 6, G: 9,
};

/** Unit spellings accepted for each kind (longest first is handled by the matcher). */
const UNIT_SPELLINGS: Record<QuantityKind, string[]> = {
  voltage: ['V', 'v', 'volt', 'volts'],
  current: ['A', 'amp', 'amps'],
  resistance: ['Ω', 'Ω', 'ohm', 'ohms', 'Ohm', 'Ohms', 'R'],
  inductance: ['H'],
  capacitance: ['F'],
  frequency: ['Hz', 'hz', 'HZ'],
  power: ['W'],
  time: ['s', 'sec'],
  temperature: ['°C', '℃', 'degC', 'C'],
  'thermal-resistance': ['K/W', '°C/W', 'C/W'],
  ratio: [],
  charge: ['C'],
};

/** Kinds whose values take no SI prefix (a "k°C" is nonsense). */
const NO_PREFIX: ReadonlySet<QuantityKind> = new Set(['temperature', 'thermal-resistance']);

const KIND_NAME: Record<QuantityKind, string> = {
  voltage: 'voltage', current: 'current', resistance: 'resistance', inductance: 'inductance',
  capacitance: 'capacitance', frequency: 'frequency', power: 'power', time: 'time',
  temperature: 'temperature', 'thermal-resistance': 'thermal resistance', ratio: 'ratio', charge: 'charge',
};

const EXAMPLES: Record<QuantityKind, string> = {
  voltage: '3V3, 3.3V, -12V, 250mV',
  current: '250m, 1.2A, 250mA',
  resistance: '10k, 10 kΩ, 1k5, 2R2',
  inductance: '2.2uH, 4u7, 100n',
  capacitance: '4.7µF, 4u7, 100nF',
  frequency: '400k, 100 kHz, 2.2MHz',
  power: '1.5W, 250mW',
  time: '20ns, 1.5us, 10m',
  temperature: '40, 85°C, -40 °C',
  'thermal-resistance': '45K/W, 60 °C/W',
  ratio: '0.8, 80%',
  charge: '12nC, 3.5n',
};

function article(word: string): string {
  return /^[aeiou]/.test(word) ? 'an' : 'a';
}

function notA(text: string, kind: QuantityKind, field: string, why = ''): { ok: false; message: string } {
  const name = KIND_NAME[kind];
  const prefix = field ? `${field}: ` : '';
  return {
    ok: false,
    message: `${prefix}"${text}" is not ${article(name)} ${name}${why ? ` (${why})` : ''} (expected e.g. ${EXAMPLES[kind]})`,
  };
}

/** Which kinds use this unit spelling (for "5A is a current, not a voltage" messages). */
function kindsOfUnit(u: string): QuantityKind[] {
  const out: QuantityKind[] = [];
  for (const k of Object.keys(UNIT_SPELLINGS) as QuantityKind[]) {
    if (UNIT_SPELLINGS[k].includes(u)) out.push(k);
  }
  return out;
}

const NUMBER_RE = /^([+-]?)(\d+(?:\.\d*)?|\.\d+)(?:[eE]([+-]?\d+))?/;
const RKM_RE = /^([+-]?)(\d+)(meg|MEG|Meg|[fpnuµμmkKMGR]|V|A|H|F|W|Ω|Ω)(\d+)(.*)$/;
/** IEC 60062 also writes values below one ohm with a leading R: R47 = 0.47 Ω. */
const LEADING_R_RE = /^([+-]?)[RΩΩ](\d+)$/;

/** Exact decimal mantissa × 10^exp, rounded once (avoids 4.7 × 1e-6 = 4.7000000000000004e-6). */
function decimal(sign: string, mantissa: string, exp: number): number {
  const v = Number(`${mantissa}e${exp}`);
  return sign === '-' ? -v : v;
}

/** Split a suffix like "mA", "kΩ", "meg", "V" into prefix exponent and unit for `kind`. */
function splitSuffix(
  suffix: string,
  kind: QuantityKind,
): { ok: true; exp: number; unit: string } | { ok: false; why: string } {
  if (suffix === '') return { ok: true, exp: 0, unit: '' };
  const units = [...UNIT_SPELLINGS[kind]].sort((a, b) => b.length - a.length);
  for (const u of units) {
    if (suffix.endsWith(u)) {
      const pre = suffix.slice(0, suffix.length - u.length).trim();
      if (pre === '') return { ok: true, exp: 0, unit: u };
      if (pre in PREFIX_EXP && !NO_PREFIX.has(kind)) return { ok: true, exp: PREFIX_EXP[pre]!, unit: u };
      // Fall through: e.g. "mC" for temperature.
    }
  }
  if (suffix in PREFIX_EXP && !NO_PREFIX.has(kind)) return { ok: true, exp: PREFIX_EXP[suffix]!, unit: '' };
  if (kind === 'ratio' && suffix === '%') return { ok: true, exp: -2, unit: '%' };
  if (kind === 'ratio' && suffix === 'ppm') return { ok: true, exp: -6, unit: 'ppm' };
  // Name the mistake when the unit belongs to another kind.
  for (let cut = 0; cut <= Math.min(3, suffix.length); cut++) {
    const pre = suffix.slice(0, cut);
    const unit = suffix.slice(cut).trim();
    if (cut > 0 && !(pre in PREFIX_EXP)) continue;
    const others = kindsOfUnit(unit).filter((k) => k !== kind);
    if (others.length > 0) {
      return { ok: false, why: `${unit} is the unit of ${others.map((k) => KIND_NAME[k]).join(' or ')}` };
    }
  }
  // Two multipliers in a row ("1kk", "1mk") or a prefix after the unit.
  const letters = suffix.replace(/\s+/g, '');
  if (letters.length >= 2 && [...letters].every((c) => c in PREFIX_EXP)) {
    return { ok: false, why: 'more than one multiplier' };
  }
  return { ok: false, why: '' };
}

/**
 * Parse an engineering-notation quantity of the given kind into base SI units.
 * `field` names the input in the message (e.g. `loads[3].current.run`).
 */
export function parseQuantity(text: string, kind: QuantityKind, field: string): ParseResult {
  if (typeof text !== 'string') return notA(String(text), kind, field);
  // Normalise: trim, unicode minus, strip spaces between parts.
  const raw = text.trim();
  if (raw === '') return { ok: false, message: `${field ? `${field}: ` : ''}empty, expected ${article(KIND_NAME[kind])} ${KIND_NAME[kind]} (e.g. ${EXAMPLES[kind]})` };
  if (raw.length > 64) return notA(raw.slice(0, 24) + '…', kind, field, 'too long');
  const s = raw.replace(/\u2212/g, '-').replace(/\s+/g, '');
  if (/^[+-]?(nan|inf|infinity)$/i.test(s)) return notA(raw, kind, field, 'not a finite number');

  // Letter-as-decimal-mark form: 3V3, 4u7, 1k5, 2R2, 4u7F. The letter is a prefix or the unit.
  const rkm = RKM_RE.exec(s);
  if (rkm) {
    const [, sign, intPart, letter, fracPart, rest] = rkm as unknown as [string, string, string, string, string, string];
    let exp = 0;
    if (letter in PREFIX_EXP) {
      if (NO_PREFIX.has(kind)) return notA(raw, kind, field, 'no multiplier allowed');
      exp = PREFIX_EXP[letter]!;
    } else if (letter === 'R' || letter === 'Ω' || letter === 'Ω') {
      if (kind !== 'resistance') return notA(raw, kind, field, `${letter} marks ohms`);
    } else if (!UNIT_SPELLINGS[kind].includes(letter)) {
      const others = kindsOfUnit(letter).filter((k) => k !== kind);
      return notA(raw, kind, field, others.length ? `${letter} is the unit of ${KIND_NAME[others[0]!]}` : '');
    }
    if (rest !== '') {
      // Only the unit may follow (4u7F, 1k5Ω); another multiplier is ambiguous (1k5k).
      if (rest in PREFIX_EXP || /^[fpnuµμmkKMG]/.test(rest) && !UNIT_SPELLINGS[kind].includes(rest)) {
        return notA(raw, kind, field, 'ambiguous: more than one multiplier');
      }
      if (!UNIT_SPELLINGS[kind].includes(rest)) {
        const others = kindsOfUnit(rest).filter((k) => k !== kind);
        return notA(raw, kind, field, others.length ? `${rest} is the unit of ${KIND_NAME[others[0]!]}` : '');
      }
      if (UNIT_SPELLINGS[kind].includes(letter)) return notA(raw, kind, field, 'unit written twice');
    }
    const value = decimal(sign, `${intPart}.${fracPart}`, exp);
    return Number.isFinite(value) ? { ok: true, value } : notA(raw, kind, field, 'out of range');
  }

  const lr = LEADING_R_RE.exec(s);
  if (lr) {
    if (kind !== 'resistance') return notA(raw, kind, field, 'R marks ohms');
    return { ok: true, value: decimal(lr[1]!, `0.${lr[2]!}`, 0) };
  }

  const m = NUMBER_RE.exec(s);
  if (!m) return notA(raw, kind, field);
  const [whole, sign = '', mantissa = '', expText] = m;
  const suffix = s.slice(whole.length);
  const split = splitSuffix(suffix, kind);
  if (!split.ok) return notA(raw, kind, field, split.why);
  const value = decimal(sign, mantissa, Number(expText ?? 0) + split.exp);
  if (!Number.isFinite(value)) return notA(raw, kind, field, 'out of range');
  return { ok: true, value };
}

/**
 * Parse a symmetric tolerance into a ratio: `±5%`, `5 %`, `+/-5%`, `0.05`, `±0.5 %`, `50ppm`.
 * A bare number is a ratio (0.05 = ±5 %); a bare number of 1 or more is refused as
 * ambiguous (write `5%`).
 */
export function parseTolerance(text: string, field = 'tolerance'): ParseResult {
  const fail = (why: string): ParseResult => ({
    ok: false,
    message: `${field ? `${field}: ` : ''}"${text}" is not a tolerance${why ? ` (${why})` : ''} (expected e.g. ±5%, 5 %, +/-1%, 0.05)`,
  });
  if (typeof text !== 'string') return fail('');
  let s = text.trim().replace(/\s+/g, '');
  if (s === '') return { ok: false, message: `${field ? `${field}: ` : ''}empty, expected a tolerance (e.g. ±5%, 0.05)` };
  if (s.startsWith('±')) s = s.slice(1);
  else if (s.startsWith('+/-') || s.startsWith('+-')) s = s.slice(s.startsWith('+/-') ? 3 : 2);
  else if (s.startsWith('-')) return fail('a tolerance is symmetric and positive');
  const m = /^(\d+(?:\.\d*)?|\.\d+)(?:[eE]([+-]?\d+))?(%|ppm)?$/.exec(s);
  if (!m) return fail('');
  const [, mant = '', expText, unit] = m;
  const base = Number(expText ?? 0);
  if (!unit && Number(`${mant}e${base}`) >= 1) return fail('ambiguous: write 5% for five percent, or a ratio below 1');
  const value = Number(`${mant}e${base + (unit === '%' ? -2 : unit === 'ppm' ? -6 : 0)}`);
  if (!Number.isFinite(value)) return fail('out of range');
  return { ok: true, value };
}

const FORMAT_PREFIXES: [number, string][] = [
  [9, 'G'], [6, 'M'], [3, 'k'], [0, ''], [-3, 'm'], [-6, 'µ'], [-9, 'n'], [-12, 'p'], [-15, 'f'],
];

function trimZeros(s: string): string {
  return s.includes('.') ? s.replace(/\.?0+$/, '') : s;
}

/**
 * Mantissa and prefix of a value rounded to `sig` significant digits, with 1 ≤ |m| < 1000
 * where the prefix range allows.
 */
export function engineering(value: number, sig = 3): { mantissa: string; prefix: string } {
  if (value === 0) return { mantissa: '0', prefix: '' };
  const digits = Math.max(1, Math.min(15, Math.round(sig)));
  // Round first, then choose the prefix, so 999.6 m with 3 digits becomes "1" not "1000 m".
  const rounded = Number(value.toPrecision(digits));
  const e = Math.floor(Math.log10(Math.abs(rounded)) + 1e-12);
  let exp3 = Math.floor(e / 3) * 3;
  exp3 = Math.max(-15, Math.min(9, exp3));
  const prefix = FORMAT_PREFIXES.find(([x]) => x === exp3)![1];
  const scaled = Number((rounded / Math.pow(10, exp3)).toPrecision(digits));
  // Outside the prefix range (below 1 f or above 999 G) keep the mantissa in exponent form.
  if (Math.abs(scaled) < 1 || Math.abs(scaled) >= 1000) return { mantissa: String(scaled), prefix };
  const intDigits = Math.floor(Math.log10(Math.abs(scaled)) + 1e-12) + 1;
  const decimals = Math.max(0, digits - intDigits);
  return { mantissa: trimZeros(scaled.toFixed(decimals)), prefix };
}

/**
 * The one quantity formatter: a value in base SI units with an SI prefix and a unit symbol,
 * rounded to `sigDigits` significant digits: (0.0123, 'A') → "12.3 mA", (4.7e-6, 'F') →
 * "4.7 µF", (400e3, 'Hz') → "400 kHz"; an empty unit leaves the bare number and prefix.
 * `formatQuantity` (by quantity kind), the drawing's and exports' `fmtQty` (engine/layout.ts)
 * and the BOM's values and ratings (engine/library.ts) all print through it.
 * Not finite: "—" (NaN), "∞", "−∞".
 */
export function formatUnit(value: number, unit: string, sigDigits = 3): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? '—' : value > 0 ? '∞' : '−∞';
  const { mantissa, prefix } = engineering(value, sigDigits);
  return `${mantissa} ${prefix}${unit}`.trimEnd();
}

/**
 * Format an SI value with an SI prefix and the kind's unit: 3.3 → "3.3 V", 0.25 → "250 mA",
 * 4.7e-6 → "4.7 µF". Temperatures take no prefix ("85 °C"); ratios print as percent.
 */
export function formatQuantity(value: number, kind: QuantityKind, sigDigits = 3): string {
  if (!Number.isFinite(value)) return formatUnit(value, '', sigDigits);
  const unit = UNIT_SYMBOL[kind];
  if (kind === 'ratio') return `${engineeringPlain(value * 100, sigDigits)} %`;
  if (NO_PREFIX.has(kind)) return `${engineeringPlain(value, sigDigits)} ${unit}`;
  return formatUnit(value, unit, sigDigits);
}

/** A number to `sig` significant digits without exponent or prefix (for °C and %). */
function engineeringPlain(value: number, sig: number): string {
  if (value === 0) return '0';
  const r = Number(value.toPrecision(Math.max(1, Math.min(15, sig))));
  if (Math.abs(r) >= 1e15 || Math.abs(r) < 1e-6) return String(r);
  // Significant digits count from the first non-zero digit: 0.012 at 3 digits is "0.012",
  // not "0.01" (leading zeros of a value below one are not significant).
  const magnitude = Math.floor(Math.log10(Math.abs(r)) + 1e-12) + 1;
  return trimZeros(r.toFixed(Math.min(20, Math.max(0, sig - magnitude))));
}

/** A tolerance ratio as "±5 %" (0.05), "±0.5 %" (0.005). */
export function formatTolerance(ratio: number, sigDigits = 3): string {
  return `±${engineeringPlain(ratio * 100, sigDigits)} %`;
}

/**
 * The letter-as-decimal-mark style used on schematics and rail names: 3.3 V → "3V3",
 * -12 V → "-12V", 4.7 µF → "4u7", 1.5 kΩ → "1k5", 2.2 Ω → "2R2", 100 nF → "100n".
 */
export function formatShorthand(value: number, kind: QuantityKind, sigDigits = 3): string {
  if (!Number.isFinite(value)) return formatQuantity(value, kind, sigDigits);
  const { mantissa, prefix } = engineering(value, sigDigits);
  if (/e/i.test(mantissa) || (value !== 0 && Math.abs(Number(mantissa)) < 1)) return formatQuantity(value, kind, sigDigits);
  // Without a prefix only volts (V) and ohms (R) have a letter to stand for the decimal
  // point; other kinds keep the ordinary form, so 1.5 A never prints as "15".
  if (prefix === '' && kind !== 'voltage' && kind !== 'resistance' && mantissa.includes('.')) {
    return formatQuantity(value, kind, sigDigits);
  }
  const ascii = prefix === 'µ' ? 'u' : prefix;
  const mark = kind === 'voltage' && prefix === '' ? 'V'
    : kind === 'resistance' && prefix === '' ? 'R'
      : ascii;
  const [i, f] = mantissa.split('.') as [string, string | undefined];
  if (f) return `${i}${mark}${f}`;
  if (kind === 'voltage' && prefix === '') return `${i}V`;
  return `${i}${ascii}`;
}
