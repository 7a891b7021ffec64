/**
 * The words an engineer reads for the engine's own keys: stage design fields, loss terms,
 * BOM groups. Base SI units stay inside; here each field gets a name in words and the kind of
 * quantity it is, so the window prints it in engineering notation with its unit. A key not
 * listed falls back to its own words split apart ("someField" → "some field"), never code.
 */
import type { QuantityKind } from '../../src-main/api/contract.ts';
import { q, pct, num } from './fmt.ts';
import { CLASS_PARAMS, KIND_NAMES, type PartClass } from '../../src-main/api/window-shared.ts';

type Unit = QuantityKind | 'ratio' | 'dB' | 'K/W' | 'turns' | 'factor' | 'plain';

/** Design fields: words and unit. */
const FIELDS: Record<string, [string, Unit]> = {
  vinMin: ['input voltage, min', 'voltage'], vinNom: ['input voltage, nominal', 'voltage'], vinMax: ['input voltage, max', 'voltage'],
  vinRipple: ['input ripple (p-p)', 'voltage'], voltage: ['voltage', 'voltage'], tolerance: ['tolerance', 'ratio'],
  currentMin: ['current, min', 'current'], currentMax: ['current, max', 'current'], rippleLimit: ['ripple limit (p-p)', 'voltage'],
  fsw: ['switching frequency', 'frequency'], primaryTurns: ['primary turns', 'turns'], inductance: ['inductance', 'inductance'],
  primaryResistance: ['primary winding resistance', 'resistance'], isat: ['saturation current', 'current'],
  coreLossFraction: ['core loss share', 'ratio'], turns: ['turns', 'turns'], coupling: ['coupling coefficient', 'ratio'],
  resistance: ['resistance', 'resistance'], is: ['diode saturation current', 'current'], n: ['diode emission coefficient', 'plain'],
  rs: ['diode series resistance', 'resistance'], vfSpread: ['forward-voltage spread', 'ratio'],
  rectifierReverseVoltage: ['rectifier reverse voltage', 'voltage'], role: ['role', 'plain'], value: ['capacitance', 'capacitance'],
  count: ['count', 'plain'], ratedVoltage: ['rated voltage', 'voltage'], workingVoltage: ['working voltage', 'voltage'],
  dielectric: ['dielectric', 'plain'], esr: ['ESR', 'resistance'], effective: ['effective capacitance at bias', 'capacitance'],
  stress: ['share of rated voltage used', 'ratio'], current: ['current', 'current'], rTop: ['top resistor', 'resistance'],
  rBottom: ['bottom resistor', 'resistance'], vref: ['reference voltage', 'voltage'], vout: ['output voltage', 'voltage'],
  error: ['set-point error', 'ratio'], rdsOn: ['on-resistance', 'resistance'], qg: ['gate charge', 'charge'],
  coss: ['output capacitance', 'capacitance'], tr: ['rise time', 'time'], tf: ['fall time', 'time'],
  rdsHotFactor: ['on-resistance rise when hot', 'factor'], iq: ['quiescent current', 'current'], minOnTime: ['minimum on-time', 'time'],
  maxDuty: ['maximum duty cycle', 'ratio'], vrefTolerance: ['reference tolerance', 'ratio'],
  negCurrentLimit: ['negative current limit', 'current'], vDrive: ['gate-drive voltage', 'voltage'], deadTime: ['dead time', 'time'],
  tjMax: ['junction temperature, max', 'temperature'], maxSecondaries: ['largest number of secondaries', 'plain'],
  powerLimit: ['power limit', 'power'], dutyWarn: ['duty cycle warning threshold', 'ratio'], class: ['class', 'plain'],
  rippleFrequency: ['ripple frequency', 'frequency'], ratedCurrent: ['rated current', 'current'],
  dropoutAtRated: ['dropout at rated current', 'voltage'], dropoutFloor: ['dropout floor', 'voltage'], accuracy: ['accuracy', 'ratio'],
  psrrDb: ['ripple rejection (PSRR)', 'dB'], psrrKnee: ['headroom for full ripple rejection', 'voltage'],
  headroomMargin: ['headroom margin', 'voltage'], name: ['name', 'plain'], thetaSource: ['source of θJA', 'plain'],
  thetaJA: ['thermal resistance θJA', 'K/W'], kind: ['kind', 'plain'], dropout: ['dropout', 'voltage'],
  inductor: ['inductor', 'plain'], highSide: ['high-side switch', 'plain'], lowSide: ['low-side switch', 'plain'], controller: ['controller', 'plain'],
  // Boost, inverting and four-switch buck-boost
  dcr: ['inductor DC resistance', 'resistance'], rhpZero: ['right-half-plane zero (Vin min, full load)', 'frequency'],
  fMin: ['lowest frequency of the loss fit', 'frequency'], fMax: ['highest frequency of the loss fit', 'frequency'],
  crossoverLimit: ['loop crossover limit (RHP zero / 5)', 'frequency'], transitionBand: ['transition band (both legs switch)', 'voltage'],
  // Load switch
  ron: ['on-resistance at 25 °C', 'resistance'], ronTempCoeff: ['on-resistance temperature coefficient (per K)', 'plain'],
  iMax: ['current rating', 'current'], iOff: ['off-state current', 'current'], cload: ['capacitance on the gated rail', 'capacitance'],
  inrush: ['inrush current at turn-on', 'current'], inrushLimit: ['inrush limit', 'current'], slewRate: ['turn-on slew rate (V/s)', 'plain'],
  riseTime: ['rise time', 'time'], offModes: ['off in mode', 'plain'],
  // Isolated module
  ratio: ['output over input at full load', 'plain'], pRated: ['rated output power', 'power'], loadReg: ['output rise from full to 10 % load', 'ratio'],
  minLoad: ['minimum load (share of rated)', 'ratio'], etaFull: ['efficiency at full load', 'ratio'], pNoLoad: ['input power at no load', 'power'],
  ripple: ['output ripple (p-p)', 'voltage'], iRated: ['rated output current', 'current'],
};

/** Groups of fields (objects and lists inside a design). */
const GROUPS: Record<string, string> = {
  outputs: 'output', secondaries: 'secondary winding', cout: 'output capacitor', cin: 'input capacitor',
  divider: 'feedback divider', highSide: 'high-side switch', lowSide: 'low-side switch', bodyDiode: 'low-side body diode',
  controller: 'controller', thetaJA: 'θJA', rectifier: 'rectifier diode', preload: 'preload', isolation: 'isolation', module: 'isolated module', transitionBand: 'transition band edge',
  package: 'package', inductor: 'inductor',
};

export function splitWords(key: string): string {
  return key.replace(/[-_]+/g, ' ').replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/\s+/g, ' ').trim().toLowerCase();
}

const cap = (s: string) => (s ? s[0]!.toUpperCase() + s.slice(1) : s);

function formatValue(v: number, unit: Unit): string {
  switch (unit) {
    case 'ratio': return pct(v, 2);
    case 'dB': return `${num(v, 3)} dB`;
    case 'K/W': return `${num(v, 3)} K/W`;
    case 'turns': return turnsText(v);
    case 'factor': return `× ${num(v, 3)}`;
    case 'plain': return num(v);
    default: return q(v, unit, 4);
  }
}

/** Winding turns with the polarity as engineers mark it: a count and "reversed" (dot at the far end). */
export function turnsText(t: number): string {
  const n = Math.abs(t);
  return `${num(n)} turn${n === 1 ? '' : 's'}${t < 0 ? ', reversed polarity (dot at the far end)' : ''}`;
}

/**
 * A stage design as rows of [name in words, value with unit]. `nodeName` turns node ids into
 * rail names. The path reads as groups: "Secondary winding 1 › output capacitor › capacitance".
 * It walks whatever fields the design has (a field a kind adds later still gets a row), so it
 * takes any value; the window passes a plan stage's `design` (the contract's StageDesign).
 */
export function designRows(design: unknown, nodeName: (id: string) => string): [string, string][] {
  const out: [string, string][] = [];
  const walk = (x: unknown, path: string[], leaf: string, underTheta: boolean) => {
    if (out.length > 160 || x === null || x === undefined) return;
    const label = () => cap(path.join(' › '));
    if (leaf === 'nodeId' && typeof x === 'string') { out.push([cap(path.slice(0, -1).concat('rail').join(' › ')), nodeName(x)]); return; }
    if (typeof x === 'number') {
      const unit: Unit = underTheta || leaf === 'thetaJA' ? 'K/W' : FIELDS[leaf]?.[1] ?? 'plain';
      out.push([label(), formatValue(x, unit)]);
      return;
    }
    if (typeof x === 'string' || typeof x === 'boolean') {
      if (leaf === 'kind') return;
      out.push([label(), String(x)]);
      return;
    }
    if (Array.isArray(x)) {
      const g = GROUPS[leaf] ?? splitWords(leaf);
      x.forEach((v, i) => walk(v, [...path.slice(0, -1), `${g} ${i + 1}`], leaf, underTheta));
      return;
    }
    if (typeof x === 'object') {
      for (const [k, v] of Object.entries(x)) {
        const isGroup = v !== null && typeof v === 'object';
        const word = isGroup ? GROUPS[k] ?? FIELDS[k]?.[0] ?? splitWords(k) : FIELDS[k]?.[0] ?? splitWords(k);
        walk(v, [...path, word], k, underTheta || leaf === 'thetaJA');
      }
    }
  };
  walk(design, [], '', false);
  return out;
}

/** Loss terms as an engineer names them. */
const LOSSES: Record<string, string> = {
  'hs-conduction': 'high-side switch conduction',
  'ls-conduction': 'low-side switch conduction',
  'hs-switching': 'high-side switching transitions',
  'output-capacitance': 'switch output capacitance (Coss) charge',
  'reverse-recovery': 'body diode reverse recovery',
  'dead-time': 'body diode in dead time',
  'gate-drive': 'gate drive',
  'primary-copper': 'primary winding copper',
  'secondary-copper': 'secondary winding copper',
  rectifiers: 'rectifier diodes',
  'magnetic-core': 'magnetic core',
  'output-capacitor-esr': 'output capacitor ESR',
  'input-capacitor-esr': 'input capacitor ESR',
  snubber: 'rectifier RC snubber',
  preload: 'preload resistor',
  quiescent: 'quiescent current',
  'pass-element': 'pass element (dropout × current)',
  'inductor-copper': 'inductor copper (DCR)',
  'inductor-core': 'inductor core',
  'ls-switching': 'low-side (main) switch transitions',
  'a-conduction': 'switch A (input leg, high side) conduction', 'b-conduction': 'switch B (input leg, low side) conduction',
  'c-conduction': 'switch C (output leg, low side) conduction', 'd-conduction': 'switch D (output leg, high side) conduction',
  'input-leg-switching': 'input-leg switching transitions', 'output-leg-switching': 'output-leg switching transitions',
  conduction: 'switch conduction (I² × Ron)', 'off-state': 'off-state current', module: 'isolated module',
};

/** Stage kinds as an engineer names them in full: each kind's registry entry (names.full). */
const kindEntry = (kind: string) => (Object.prototype.hasOwnProperty.call(KIND_NAMES, kind) ? (KIND_NAMES as Record<string, { full: string; noun: string }>)[kind] : undefined);
export const kindName = (kind: string): string => kindEntry(kind)?.full ?? splitWords(kind);
/** A stage kind's plain trade word ("buck", "LDO"): its registry entry (names.noun). */
export const kindNoun = (kind: string): string => kindEntry(kind)?.noun ?? splitWords(kind);
export const lossName = (key: string): string => LOSSES[key] ?? splitWords(key);
/** True when the term has its own name here (tests check the engine's terms are all named). */
export const isNamedLoss = (key: string): boolean => key in LOSSES;

/** BOM groups in words. */
const BOM_GROUPS: Record<string, string> = {
  controller: 'Controllers', ldo: 'Linear regulators (LDO)', 'magnetic-custom': 'Custom magnetics (to specification)',
  inductor: 'Inductors', rectifier: 'Rectifier diodes', 'cap-aluminium': 'Aluminium electrolytic capacitors',
  'cap-ceramic': 'Ceramic capacitors', resistor: 'Resistors', mosfet: 'Switches (MOSFETs)', switch: 'Switches (MOSFETs)',
  diode: 'Diodes', capacitor: 'Capacitors',
};
export const bomGroupName = (key: string): string => BOM_GROUPS[key] ?? cap(splitWords(key));

/** Base SI unit of a library parameter → the quantity printed in engineering notation. */
const UNIT_KIND: Record<string, QuantityKind> = {
  V: 'voltage', A: 'current', 'Ω': 'resistance', F: 'capacitance', H: 'inductance', s: 'time', W: 'power', C: 'charge', 'K/W': 'thermal-resistance',
};

/**
 * Library parameters as an engineer writes them in a parts table (trade symbols; common
 * practice). A key not listed here is split into words.
 */
const PARAM_LABELS: Record<string, string> = {
  package: 'package', manufacturer: 'manufacturer', partNumber: 'part number',
  iMax: 'I out max', vinMax: 'V in max', vinMin: 'V in min', vinNom: 'V in nom', iq: 'I q', tonMin: 't on min', dMax: 'duty max',
  integrated: 'switches inside', forcedPwm: 'forced PWM', rdsHs: 'Rds(on) high side', rdsLs: 'Rds(on) low side',
  negLimit: 'negative current limit', thetaJA: 'θJA', uvlo: 'UVLO rising', vref: 'V ref', vrefTolerance: 'V ref tolerance',
  iLimit: 'peak current limit', topology: 'topology',
  vds: 'Vds max', id: 'Id max', rdsOn: 'Rds(on) at 25 °C', qg: 'Qg', coss: 'Coss', tr: 't rise', tf: 't fall', rdsTempFactor: 'Rds(on) hot / 25 °C',
  dropout: 'dropout at I max', psrrDb: 'PSRR', negative: 'negative regulator', accuracy: 'accuracy', dropoutFloor: 'dropout at no load',
  vr: 'Vrrm', if: 'If avg max', vf: 'Vf', cj: 'Cj', trr: 't rr',
  dielectric: 'dielectric', vRated: 'V rated', cMin: 'C min', cMax: 'C max', esr: 'ESR', iRipple: 'ripple current rating',
  power: 'power rating', tolerance: 'tolerance',
  lMin: 'L min', lMax: 'L max', iSat: 'I sat', dcr: 'DCR', iRms: 'I rms rating',
  maxWindings: 'windings max', pMax: 'P max', costPerWinding: 'cost per winding', isolation: 'isolation class',
  ron: 'R on', ratio: 'voltage ratio', pRated: 'P rated', loadReg: 'load regulation', minLoad: 'minimum load',
  etaFull: 'efficiency at full load', pNoLoad: 'no-load loss', workingVoltage: 'working voltage', ripple: 'output ripple',
};

/** Part classes as the library's class filter names them. */
const CLASS_WORDS: Record<string, string> = {
  controller: 'controllers and regulators', switch: 'switches (MOSFETs)', ldo: 'linear regulators (LDO)', rectifier: 'rectifier diodes',
  'cap-ceramic': 'ceramic capacitors', 'cap-aluminium': 'aluminium electrolytic capacitors', 'cap-polymer': 'polymer capacitors',
  resistor: 'resistors', inductor: 'inductors', 'magnetic-custom': 'custom magnetics', 'load-switch': 'load switches', 'iso-module': 'isolated modules',
};
export const partClassName = (key: string): string => CLASS_WORDS[key] ?? splitWords(key);

/** What a library column means: the parameter's own description and its unit, where known. */
export function libraryColumn(key: string, partClass?: string): { label: string; hint: string; kind: QuantityKind | null; unit: string } {
  if (!key.startsWith('params.')) return { label: key === 'partClass' ? 'class' : key === 'cost' ? 'cost estimate' : splitWords(key), hint: '', kind: null, unit: '' };
  const k = key.slice(7);
  const classes = (partClass ? [partClass] : Object.keys(CLASS_PARAMS)) as PartClass[];
  const spec = classes.map((c) => CLASS_PARAMS[c]?.find((p) => p.key === k)).find((p) => p) ?? Object.values(CLASS_PARAMS).flat().find((p) => p.key === k);
  const unit = spec?.unit ?? '';
  return { label: (PARAM_LABELS[k] ?? splitWords(k)) + (unit ? ` (${unit})` : ''), hint: spec?.doc ?? '', kind: UNIT_KIND[unit] ?? null, unit };
}

/** A library value as the grid shows it: engineering notation with its unit. */
export function libraryValue(v: unknown, col: { kind: QuantityKind | null; unit: string }): string {
  if (v === null || v === undefined) return '';
  if (typeof v !== 'number') return String(v);
  if (col.kind) return q(v, col.kind, 4);
  return col.unit ? `${num(v)} ${col.unit}` : num(v);
}
