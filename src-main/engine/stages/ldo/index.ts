/**
 * Linear regulator (LDO), positive or negative (DESIGN.md §4 [C]):
 * P = (Vin − Vout)·Iout + Vin·Iq, η = Pout/Pin, dropout checked at the input's ripple
 * trough, ripple out = ripple in × 10^(−PSRR/20) with PSRR fading near dropout, and
 * Tj = Ta + P·θJA (θJA as JEDEC JESD51-2 defines it: a package comparison figure).
 */
import type { Amps, Celsius, Ratio, Volts, Watts } from '../../units.ts';
import type { DesignFields, OperatingPoint, OutputSpec, StageEvaluation, StageFlag, StageSpec } from '../types.ts';
import { GENERIC_DEFAULTS, type LdoPackage } from '../defaults.ts';
import { chooseCeramic, flag, part, r3, rippleFlags, thermalFlags, type CapacitorChoice } from '../common.ts';
import { specErrors } from '../buck/index.ts';
import { DEFAULT_MARGINS, type StagePartRef } from '../part-choice.ts';
import type { LibraryRow } from '../../library.ts';
import { boundingCases, type OutputSpan, type ToleranceCase, type ToleranceDraw } from '../window-cases.ts';

/** The fields every Ldo design carries (registry.ts `designFields`). */
export function ldoDesignFields(): DesignFields<LdoDesign> {
  return { kind: true, vinMin: true, vinNom: true, vinMax: true, vinRipple: true, outputs: true, rippleFrequency: true, ratedCurrent: true, dropoutAtRated: true, dropoutFloor: true, iq: true, accuracy: true, psrrDb: true, psrrKnee: true, headroomMargin: true, package: true, thetaSource: true, cin: true, cout: true, tjMax: true };
}

export interface LdoDesign {
  kind: 'ldo';
  vinMin: Volts;
  vinNom: Volts;
  vinMax: Volts;
  /** Peak-to-peak ripple riding on the input (from the stage feeding it). */
  vinRipple: Volts;
  outputs: OutputSpec[];
  /** Frequency of the input ripple (the feeding stage's switching frequency; 0 = none). */
  rippleFrequency: number;
  ratedCurrent: Amps;
  /** Dropout = dropoutFloor + dropoutAtRated·I/ratedCurrent. */
  dropoutAtRated: Volts;
  dropoutFloor: Volts;
  iq: Amps;
  /** Output accuracy over line, load and temperature (±). */
  accuracy: Ratio;
  psrrDb: number;
  /** Headroom above dropout below which the rejection fades linearly to 0 dB. */
  psrrKnee: Volts;
  headroomMargin: Volts;
  package: LdoPackage;
  thetaSource: 'library' | 'default-from-memory';
  cin: CapacitorChoice;
  cout: CapacitorChoice;
  tjMax: Celsius;
  /** The library row the regulator is (absent: generic defaults from memory). */
  parts?: StagePartRef[];
}

/**
 * Ripple rejection (dB) at a ripple frequency f and a load share of the rated current: the
 * stated figure up to the corner, then −20 dB/decade down to the floor, less the load term
 * (two-region model from memory, stages/defaults.ts ldo.psrr*). Never above the stated figure.
 */
export function ldoPsrrAt(psrrDb: number, f: number, loadShare: number): number {
  const L = GENERIC_DEFAULTS.ldo;
  const fall = f > L.psrrCornerHz ? 20 * Math.log10(f / L.psrrCornerHz) : 0;
  const byFreq = Math.max(Math.min(L.psrrFloorDb, psrrDb), psrrDb - fall);
  return Math.max(0, byFreq - L.psrrLoadDb * Math.min(1, Math.max(0, loadShare)));
}

export function ldoDropout(d: LdoDesign, i: number): number {
  return d.dropoutFloor + (d.dropoutAtRated * Math.abs(i)) / d.ratedCurrent;
}

/** The output at one window corner (windows.ts), a magnitude: the setpoint moves by the stated accuracy. */
export function ldoWindowOutputs(d: LdoDesign, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[] {
  const set = Math.abs(d.outputs[0]!.voltage) * (1 + d.accuracy * x.accuracy);
  const p = ldoPoint(d, Math.abs(vin), iout[0] ?? 0, set);
  return [{ lo: p.vout - p.ripple / 2, hi: p.vout + p.ripple / 2 }];
}

/** Accuracy low and high bound the output. */
export function ldoWindowCases(): ToleranceCase[] {
  return boundingCases('accuracy');
}

/** Output magnitude, rejection and headroom at an input magnitude and current. */
export function ldoPoint(d: LdoDesign, vinMag: number, i: number, setpoint = Math.abs(d.outputs[0]!.voltage)) {
  const trough = vinMag - d.vinRipple / 2;
  const vdo = ldoDropout(d, i);
  const headroom = trough - setpoint - vdo;
  const vout = Math.min(setpoint, trough - vdo);
  const fade = Math.max(0, Math.min(1, headroom / d.psrrKnee));
  const psrr = ldoPsrrAt(d.psrrDb, d.rippleFrequency, Math.abs(i) / d.ratedCurrent) * fade;
  const ripple = d.rippleFrequency > 0 ? d.vinRipple * 10 ** (-psrr / 20) : 0;
  return { trough, vdo, headroom, vout: Math.max(0, vout), psrr, ripple };
}

export function evaluateLdo(d: LdoDesign, op: OperatingPoint): StageEvaluation {
  const sign = Math.sign(d.outputs[0]!.voltage) || 1;
  const vinMag = Math.abs(op.vin);
  const i = Math.abs(op.iout[0] ?? 0);
  const p = ldoPoint(d, vinMag, i);
  const flags: StageFlag[] = [];
  if (Math.sign(op.vin) !== sign && op.vin !== 0) {
    flags.push(flag('input-polarity', 'error', `input ${r3(op.vin)} V and output ${r3(d.outputs[0]!.voltage)} V have opposite signs`, { vin: op.vin }));
  }
  if (p.headroom < 0) {
    flags.push(flag('dropout', 'error',
      `in dropout: input trough ${r3(p.trough)} V is below ${r3(Math.abs(d.outputs[0]!.voltage))} V + ${r3(p.vdo)} V dropout at ${r3(i)} A (short by ${r3(-p.headroom)} V)`,
      { trough: r3(p.trough), dropout: r3(p.vdo), shortfall: r3(-p.headroom) }));
  } else if (p.headroom < d.headroomMargin) {
    flags.push(flag('low-headroom', 'warning',
      `only ${r3(p.headroom * 1e3)} mV above dropout at the input trough (margin ${r3(d.headroomMargin * 1e3)} mV); ripple rejection is ${r3(p.psrr)} dB`,
      { headroom: r3(p.headroom), psrr: r3(p.psrr) }));
  }
  const pass = (vinMag - p.vout) * i;
  const quiescent = vinMag * d.iq;
  const pout = p.vout * i;
  const loss = pass + quiescent;
  const pin = pout + loss;
  const parts = [part('LDO', loss, d.package.thetaJA, op.ambient as number, d.thetaSource)];
  flags.push(...thermalFlags(parts, d.tjMax));
  const outputs = [{ nodeId: d.outputs[0]!.nodeId, voltage: (sign * p.vout) as Volts, current: i as Amps, ripplePP: p.ripple as Volts }];
  flags.push(...rippleFlags(outputs, d.outputs));
  return {
    kind: 'ldo',
    vin: op.vin,
    iin: (pin / Math.max(vinMag, 1e-12)) as Amps,
    pin: pin as Watts,
    pout: pout as Watts,
    loss: loss as Watts,
    efficiency: (pin > 0 ? pout / pin : 0) as Ratio,
    lossBreakdown: { 'pass-element': pass as Watts, quiescent: quiescent as Watts },
    parts,
    outputs,
    flags,
  };
}

const pnum = (r: LibraryRow, k: string) => (typeof r.params[k] === 'number' ? r.params[k] as number : NaN);

/**
 * With a library: the cheapest LDO row of the output's polarity rated for the current, the
 * input (with the input-rating margin) and the dissipation (Tj with its θJA), that holds its
 * headroom at the input trough; its dropout, quiescent current, ripple rejection, accuracy
 * and θJA become the design's.
 */
function designFromLibrary(spec: StageSpec, lib: readonly LibraryRow[], base: LdoDesign, vinLo: number, vinHi: number, imax: number): { design: LdoDesign; reason: string } | { problem: string } {
  const neg = base.outputs[0]!.voltage < 0 ? 1 : 0;
  const margin = spec.margins?.controllerInput ?? DEFAULT_MARGINS.controllerInput;
  const vout = Math.abs(base.outputs[0]!.voltage);
  const tjBudget = (spec.tjMax as number) - (spec.ambient as number);
  const rows = lib.filter((r) => r.partClass === 'ldo' && (pnum(r, 'negative') || 0) === neg && pnum(r, 'iMax') >= imax && pnum(r, 'vinMax') >= vinHi * (1 + margin) - 1e-9)
    .sort((a, b) => a.cost - b.cost || (a.id < b.id ? -1 : 1));
  const why: string[] = [];
  let loose: { design: LdoDesign; reason: string } | null = null;
  for (const r of rows) {
    const iq = pnum(r, 'iq');
    const pmax = (vinHi - vout) * imax + vinHi * iq;
    const th = pnum(r, 'thetaJA');
    if (pmax * th > tjBudget) { why.push(`${r.id}: ${r3(pmax)} W × ${th} K/W exceeds the ${r3(tjBudget)} K budget`); continue; }
    const generic: string[] = [];
    const acc = Number.isFinite(pnum(r, 'accuracy')) ? pnum(r, 'accuracy') : (generic.push('accuracy'), GENERIC_DEFAULTS.ldo.accuracy);
    const floor = Number.isFinite(pnum(r, 'dropoutFloor')) ? pnum(r, 'dropoutFloor') : (generic.push('dropoutFloor'), GENERIC_DEFAULTS.ldo.dropoutFloor);
    const d: LdoDesign = {
      ...base,
      ratedCurrent: pnum(r, 'iMax') as Amps,
      dropoutAtRated: pnum(r, 'dropout') as Volts,
      dropoutFloor: floor as Volts,
      iq: iq as Amps,
      accuracy: acc as Ratio,
      psrrDb: pnum(r, 'psrrDb'),
      package: { name: typeof r.params.package === 'string' ? r.params.package : '', thetaJA: th },
      thetaSource: 'library',
      parts: [{ role: neg ? 'negative LDO' : 'LDO', libraryId: r.id, used: { iMax: pnum(r, 'iMax'), vinMax: pnum(r, 'vinMax'), dropout: pnum(r, 'dropout'), iq, psrrDb: pnum(r, 'psrrDb'), thetaJA: th, accuracy: acc }, generic }],
    };
    const p = ldoPoint(d, vinLo, imax);
    if (p.headroom < 0) { why.push(`${r.id}: ${r3(-p.headroom)} V short of its dropout at the ${r3(p.trough)} V trough`); continue; }
    // Accuracy grade: the row's accuracy plus half the output ripple must fit the rail's band
    // (the window stacks them, windows.ts); a cheaper, looser row is skipped for a tighter one.
    const tol = base.outputs[0]!.tolerance as number;
    const reason = `${r.name} (${r.id}): ${pnum(r, 'iMax')} A, ${pnum(r, 'vinMax')} V in (≥ ${r3(vinHi * (1 + margin))} V), θJA ${th} K/W from the library keeps ${r3(pmax)} W under ${spec.tjMax} °C`;
    if (acc * vout + p.ripple / 2 > tol * vout + 1e-12) {
      // Kept in reserve: when no row is accurate enough the cheapest stands and the window check reports the miss.
      loose ??= { design: d, reason: `${reason}; its accuracy ±${r3(acc * 100)} % with ${r3(p.ripple * 1e3)} mV ripple does not fit ±${r3(tol * 100)} % and no row in the library does` };
      continue;
    }
    return { design: d, reason: `${r.name} (${r.id}): ${pnum(r, 'iMax')} A, ${pnum(r, 'vinMax')} V in (≥ ${r3(vinHi * (1 + margin))} V), θJA ${th} K/W from the library keeps ${r3(pmax)} W under ${spec.tjMax} °C; accuracy ±${r3(acc * 100)} % within the rail's ±${r3(tol * 100)} %` };
  }
  if (loose) return loose;
  return { problem: `no ${neg ? 'negative ' : ''}LDO in the library carries ${r3(imax)} A from ${r3(vinHi)} V (rated ≥ ${r3(vinHi * (1 + margin))} V)${why.length ? `: ${why.slice(0, 3).join('; ')}` : ''}` };
}

export function designLdo(spec: StageSpec): { ok: true; design: LdoDesign; reasons: string[]; flags: StageFlag[] } | { ok: false; flags: StageFlag[] } {
  const bad = specErrors(spec);
  if (bad.length) return { ok: false, flags: bad };
  if (spec.outputs.length !== 1) return { ok: false, flags: [flag('bad-input', 'error', `an LDO has exactly one output (got ${spec.outputs.length})`, { field: 'outputs' })] };
  const o = spec.outputs[0]!;
  const sign = Math.sign(o.voltage);
  if (Math.sign(spec.vinMin) !== sign || Math.sign(spec.vinMax) !== sign) {
    return { ok: false, flags: [flag('input-polarity', 'error', `input ${r3(spec.vinMin)}…${r3(spec.vinMax)} V must have the sign of the ${r3(o.voltage)} V output`, { field: 'vinMin' })] };
  }
  // Work in magnitudes: for a negative regulator "min" is the least negative input.
  const vinLo = Math.min(Math.abs(spec.vinMin), Math.abs(spec.vinMax));
  const vinHi = Math.max(Math.abs(spec.vinMin), Math.abs(spec.vinMax));
  const vout = Math.abs(o.voltage);
  const imax = o.currentMax as number;
  const L = GENERIC_DEFAULTS.ldo;
  const reasons: string[] = [];
  // With a library the row sets rating and package (designFromLibrary); the generic choice
  // below only stands in as the base the row's values replace.
  const rated = L.ratedCurrents.find((r) => r >= imax * 1.2) ?? (spec.library ? imax * 1.2 : undefined);
  if (rated === undefined) {
    return { ok: false, flags: [flag('current-too-high', 'error', `${r3(imax)} A is beyond the largest generic LDO rating ${L.ratedCurrents.at(-1)} A (with 20 % margin)`, { imax })] };
  }
  const ripple = Math.max(0, (spec.vinRipple ?? 0) as number);
  const pmax = (vinHi - vout) * imax + vinHi * L.iq;
  const tjBudget = (spec.tjMax as number) - (spec.ambient as number);
  const pkg = L.packages.find((p) => pmax * p.thetaJA <= tjBudget) ?? (spec.library ? L.packages[L.packages.length - 1] : undefined);
  if (!pkg) {
    const best = L.packages[L.packages.length - 1]!;
    return { ok: false, flags: [flag('tj-over-limit', 'error',
      `${r3(pmax)} W at Vin ${r3(vinHi)} V needs θJA ≤ ${r3(tjBudget / pmax)} K/W; the best generic package (${best.name}, ${best.thetaJA} K/W) reaches ${r3((spec.ambient as number) + pmax * best.thetaJA)} °C`,
      { power: r3(pmax), thetaNeeded: r3(tjBudget / pmax) })] };
  }
  reasons.push(`${rated} A rating for ${r3(imax)} A (20 % margin); package ${pkg.name} (θJA ${pkg.thetaJA} K/W, default from memory) keeps ${r3(pmax)} W under ${spec.tjMax} °C`);
  const generic: LdoDesign = {
    kind: 'ldo',
    vinMin: spec.vinMin, vinNom: spec.vinNom, vinMax: spec.vinMax,
    vinRipple: ripple as Volts,
    outputs: [{ ...o }],
    rippleFrequency: spec.fsw as number,
    ratedCurrent: rated as Amps,
    dropoutAtRated: L.dropoutAtRated as Volts,
    dropoutFloor: L.dropoutFloor as Volts,
    iq: L.iq as Amps,
    accuracy: L.accuracy as Ratio,
    psrrDb: L.psrrDb,
    psrrKnee: L.psrrKnee as Volts,
    headroomMargin: L.headroomMargin as Volts,
    package: { ...pkg },
    thetaSource: 'default-from-memory',
    cin: chooseCeramic('LDO input', 1e-6, vinHi, spec.ceramicDerating),
    cout: chooseCeramic('LDO output', 2.2e-6, vout * 1.1, spec.ceramicDerating),
    tjMax: spec.tjMax,
  };
  let design = generic;
  if (spec.library) {
    const r = designFromLibrary(spec, spec.library, generic, vinLo, vinHi, imax);
    if ('problem' in r) return { ok: false, flags: [flag('no-library-part', 'error', r.problem, { imax, vinMax: vinHi })] };
    design = r.design;
    reasons.length = 0;
    reasons.push(`part: ${r.reason}`);
  }
  const flags: StageFlag[] = [];
  const seen = new Set<string>();
  for (const vin of [vinLo, vinHi]) {
    for (const f of evaluateLdo(design, { vin: (sign * vin) as Volts, iout: [imax as Amps], ambient: spec.ambient }).flags) {
      if (!seen.has(f.code)) { seen.add(f.code); flags.push(f); }
    }
  }
  if (flags.some((f) => f.severity === 'error')) return { ok: false, flags };
  const p = ldoPoint(design, vinLo, imax);
  reasons.push(`headroom ${r3(p.headroom)} V above dropout at the ${r3(p.trough)} V input trough; ripple rejection ${r3(p.psrr)} dB there`);
  return { ok: true, design, reasons, flags };
}
