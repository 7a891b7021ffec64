/**
 * Semantic checks of a Requirements value: everything a well-typed project can still get
 * wrong. Returns one problem per mistake, each with the path of the field (as the JSON
 * format writes it, e.g. `loads[3].tolerance`) and a sentence saying what is wrong.
 * Pure; the store, the importer, the CLI and the window all call it.
 */
import { ISOLATION_CLASSES, NOISE_CLASSES, STAGE_KINDS, type BatterySpec, type Requirements, type Source } from './model.ts';
import { groupRails, MAX_PLANNED_RAILS } from './rails.ts';
import { CHEMISTRY_PRESETS, BATTERY_CHEMISTRIES, packFullVoltage } from './battery.ts';

/** Problems of a battery source: [field path, message]. */
export function batteryProblems(b: BatterySpec, s: Pick<Source, 'vMin' | 'vMax'>, p: string): Array<[string, string]> {
  const out: Array<[string, string]> = [];
  if (!b || typeof b !== 'object') return [[p, 'must be an object { chemistry, cells, capacity, endVoltage }']];
  if (!BATTERY_CHEMISTRIES.includes(b.chemistry)) return [[`${p}.chemistry`, `"${String(b.chemistry)}" is not one of ${BATTERY_CHEMISTRIES.join(', ')}`]];
  const preset = CHEMISTRY_PRESETS[b.chemistry];
  if (!Number.isInteger(b.cells) || !preset.cells.includes(b.cells)) out.push([`${p}.cells`, `${preset.label} presets take ${preset.cells.join(', ')} cells in series (got ${String(b.cells)})`]);
  if (typeof b.capacity !== 'number' || !Number.isFinite(b.capacity) || !(b.capacity > 0)) out.push([`${p}.capacity`, `capacity must be above 0 A·h (got ${String(b.capacity)})`]);
  if (typeof b.endVoltage !== 'number' || !Number.isFinite(b.endVoltage) || !(b.endVoltage > 0)) out.push([`${p}.endVoltage`, `end-of-discharge voltage must be above 0 V (got ${String(b.endVoltage)})`]);
  if (b.curve !== undefined) {
    const ok = Array.isArray(b.curve) && b.curve.length >= 2 && b.curve.every((q) => Array.isArray(q) && q.length === 2 && q.every((x) => typeof x === 'number' && Number.isFinite(x)) && q[0]! >= 0 && q[0]! <= 1 && q[1]! > 0);
    if (!ok) out.push([`${p}.curve`, 'a list of at least two [state of charge 0…1, cell voltage > 0] pairs']);
  }
  if (out.length) return out;
  const full = packFullVoltage(b);
  if (s.vMax < full - 1e-9) out.push([`${p}`, `the pack reaches ${full.toFixed(2)} V when full, above the source's vMax ${s.vMax} V: the planner must design over the whole discharge range`]);
  if (s.vMin > b.endVoltage + 1e-9) out.push([`${p}.endVoltage`, `discharge ends at ${b.endVoltage} V, below the source's vMin ${s.vMin} V: lower vMin to it so the planner designs over the whole range`]);
  return out;
}
import { formatQuantity, formatTolerance } from './notation.ts';
import { showText, textProblem } from './text-rules.ts';

export interface Problem {
  path: string;
  message: string;
}

/** Tolerance on the sum of mode shares (they are ratios typed by people). */
export const SHARE_SUM_TOLERANCE = 1e-6;
/** Voltages closer than this are the same rail voltage (as rails.ts groups them). */
const SAME_VOLTAGE = 0.5e-3;

const isNum = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/**
 * Load power against what the sources can give: in any mode the loads take Σ|V|·I, and no
 * converter gives out more power than it takes in (η ≤ 1), so the sources must give at least
 * that at their lowest voltage, V min × I limit (energy conservation, common practice).
 */
export function sourceCapacityProblems(req: Requirements): Problem[] {
  const cap = req.sources.reduce((a, s) => a + (isNum(s.vMin) && isNum(s.currentLimit) ? Math.max(0, s.vMin) * Math.max(0, s.currentLimit) : 0), 0);
  const w = (x: number) => formatQuantity(x, 'power', 3);
  const out: Problem[] = [];
  req.modes.forEach((m, i) => {
    const p = req.loads.reduce((a, l) => a + (isNum(l.voltage) && isNum(l.current?.[m.id]) ? Math.abs(l.voltage) * l.current[m.id]! : 0), 0);
    if (req.sources.length && p > cap * (1 + 1e-9)) {
      const how = req.sources.map((s) => `${s.name}: ${formatQuantity(s.vMin, 'voltage', 3)} × ${formatQuantity(s.currentLimit, 'current', 3)}`).join(', ');
      out.push({ path: `modes[${i}]`, message: `mode "${m.name}": the loads take ${w(p)}, more than the sources can give at their minimum voltage (${how} = ${w(cap)}), before any conversion loss` });
    }
  });
  return out;
}

export function validateRequirements(req: Requirements): Problem[] {
  const out: Problem[] = [...sourceCapacityProblems(req)];
  const add = (path: string, message: string) => out.push({ path, message });
  const v = (x: number) => formatQuantity(x, 'voltage', 4);
  // User text quoted in a message is shown escaped: the message may reach a terminal.
  const t = (x: unknown) => showText(String(x));
  const text = (path: string, x: unknown, kind: 'name' | 'description' = 'name') => {
    const p = textProblem(path, x, kind);
    if (p) out.push(p);
  };

  // Every piece of user text follows the one rule of text-rules.ts.
  text('meta.name', req.meta.name);
  text('meta.description', req.meta.description, 'description');
  for (const [list, path] of [[req.sources, 'sources'], [req.domains, 'domains'], [req.modes, 'modes'], [req.loads, 'loads']] as const) {
    (list as readonly { id: unknown; name: unknown }[]).forEach((it, i) => {
      text(`${path}[${i}].id`, it.id);
      text(`${path}[${i}].name`, it.name);
    });
  }
  req.loads.forEach((l, i) => {
    text(`loads[${i}].domainId`, l.domainId);
    text(`loads[${i}].railKey`, l.railKey);
  });

  const uniqueIds = (items: { id: string }[], path: string, what: string) => {
    const seen = new Map<string, number>();
    items.forEach((it, i) => {
      if (typeof it.id !== 'string' || it.id.trim() === '') {
        add(`${path}[${i}].id`, `${what} id is empty`);
        return;
      }
      const prev = seen.get(it.id);
      if (prev !== undefined) add(`${path}[${i}].id`, `${what} id "${t(it.id)}" is already used by ${path}[${prev}]`);
      else seen.set(it.id, i);
    });
  };
  const named = (items: { name: string }[], path: string, what: string) => {
    items.forEach((it, i) => {
      if (typeof it.name !== 'string' || it.name.trim() === '') add(`${path}[${i}].name`, `${what} name is empty`);
    });
  };

  // Sources.
  if (req.sources.length === 0) add('sources', 'the project needs at least one source');
  uniqueIds(req.sources, 'sources', 'source');
  named(req.sources, 'sources', 'source');
  req.sources.forEach((s, i) => {
    const p = `sources[${i}]`;
    let finite = true;
    for (const k of ['vNom', 'vMin', 'vMax', 'currentLimit'] as const) {
      if (!isNum(s[k])) { add(`${p}.${k}`, `${k} is not a finite number`); finite = false; }
    }
    if (!finite) return;
    for (const k of ['vMin', 'vNom', 'vMax'] as const) {
      if (s[k] <= 0) add(`${p}.${k}`, `${k} must be above 0 V (got ${v(s[k])}); negative or zero sources are not supported`);
    }
    if (s.vMin > s.vNom) add(`${p}.vMin`, `vMin (${v(s.vMin)}) is above vNom (${v(s.vNom)})`);
    if (s.vNom > s.vMax) add(`${p}.vMax`, `vMax (${v(s.vMax)}) is below vNom (${v(s.vNom)})`);
    if (s.currentLimit <= 0) add(`${p}.currentLimit`, `current limit must be above 0 A (got ${formatQuantity(s.currentLimit, 'current')})`);
    if (s.battery !== undefined) batteryProblems(s.battery, s, `${p}.battery`).forEach(([f, m]) => add(f, m));
  });

  // Domains.
  if (req.domains.length === 0) add('domains', 'the project needs at least one domain');
  uniqueIds(req.domains, 'domains', 'domain');
  named(req.domains, 'domains', 'domain');
  req.domains.forEach((d, i) => {
    const p = `domains[${i}]`;
    if (!ISOLATION_CLASSES.includes(d.isolation)) {
      add(`${p}.isolation`, `isolation class "${t(d.isolation)}" is not one of ${ISOLATION_CLASSES.join(', ')}`);
    }
    if (!isNum(d.workingVoltage) || d.workingVoltage < 0) {
      add(`${p}.workingVoltage`, 'working voltage must be a finite number ≥ 0 V');
    } else if (d.isolation !== 'none' && d.workingVoltage <= 0) {
      add(`${p}.workingVoltage`, `an isolated domain (${d.isolation}) needs a working voltage above 0 V`);
    }
  });

  // Operating modes.
  if (req.modes.length === 0) add('modes', 'the project needs at least one operating mode');
  uniqueIds(req.modes, 'modes', 'mode');
  named(req.modes, 'modes', 'mode');
  let shareSum = 0;
  let sharesFinite = true;
  req.modes.forEach((m, i) => {
    if (!isNum(m.share) || m.share < 0 || m.share > 1) {
      add(`modes[${i}].share`, `share of time must be between 0 and 1 (got ${String(m.share)})`);
      sharesFinite = sharesFinite && isNum(m.share);
    }
    if (isNum(m.share)) shareSum += m.share;
  });
  if (req.modes.length > 0 && sharesFinite && Math.abs(shareSum - 1) > SHARE_SUM_TOLERANCE) {
    add('modes', `shares of time sum to ${Number(shareSum.toPrecision(6))}, they must sum to 1`);
  }

  // Loads.
  uniqueIds(req.loads, 'loads', 'load');
  named(req.loads, 'loads', 'load');
  const domainIds = new Set(req.domains.map((d) => d.id));
  const modeIds = new Set(req.modes.map((m) => m.id));
  req.loads.forEach((l, i) => {
    const p = `loads[${i}]`;
    if (!domainIds.has(l.domainId)) add(`${p}.domainId`, `domain "${t(l.domainId)}" does not exist`);
    if (!isNum(l.voltage)) add(`${p}.voltage`, 'voltage is not a finite number');
    else if (Math.abs(l.voltage) < 1e-3) add(`${p}.voltage`, `voltage must not be 0 V (got ${v(l.voltage)})`);
    if (!isNum(l.tolerance) || l.tolerance <= 0 || l.tolerance >= 0.5) {
      add(`${p}.tolerance`, `tolerance must be above 0 and below ±50 % (got ${isNum(l.tolerance) ? formatTolerance(l.tolerance) : String(l.tolerance)})`);
    }
    if (!isNum(l.rippleLimit) || l.rippleLimit <= 0) add(`${p}.rippleLimit`, 'ripple limit must be above 0 V');
    if (!NOISE_CLASSES.includes(l.noiseClass)) {
      add(`${p}.noiseClass`, `noise class "${t(l.noiseClass)}" is not one of ${NOISE_CLASSES.join(', ')}`);
    }
    for (const [modeId, a] of Object.entries(l.current ?? {})) {
      const cp = `${p}.current.${t(modeId)}`;
      if (!modeIds.has(modeId)) add(cp, `mode "${t(modeId)}" does not exist`);
      if (!isNum(a)) add(cp, 'current is not a finite number');
      else if (a < 0) add(cp, `current must not be negative (got ${formatQuantity(a, 'current')})`);
    }
  });

  // Manual rail keys: loads sharing a key must agree on domain and voltage.
  const byKey = new Map<string, number[]>();
  req.loads.forEach((l, i) => {
    const k = typeof l.railKey === 'string' ? l.railKey.trim() : '';
    if (k === '') return;
    const g = byKey.get(k);
    if (g) g.push(i); else byKey.set(k, [i]);
  });
  for (const [key, idx] of byKey) {
    const first = req.loads[idx[0]!]!;
    for (const i of idx.slice(1)) {
      const l = req.loads[i]!;
      if (l.domainId !== first.domainId) {
        add(`loads[${i}].railKey`, `rail "${t(key)}" joins loads of different domains ("${t(first.domainId)}" and "${t(l.domainId)}")`);
      } else if (isNum(l.voltage) && isNum(first.voltage) && Math.abs(l.voltage - first.voltage) >= SAME_VOLTAGE) {
        add(`loads[${i}].railKey`, `rail "${t(key)}" joins loads at different voltages (${v(first.voltage)} and ${v(l.voltage)})`);
      }
    }
  }

  // Design limits.
  const lim = req.limits;
  for (const k of ['ambient', 'tjMax', 'tjMargin'] as const) {
    if (!isNum(lim[k])) add(`limits.${k}`, `${k} is not a finite number`);
  }
  if (isNum(lim.ambient) && isNum(lim.tjMax) && isNum(lim.tjMargin)) {
    if (lim.tjMargin < 0) add('limits.tjMargin', 'junction temperature margin must not be negative');
    if (lim.tjMax - lim.tjMargin <= lim.ambient) {
      add('limits.tjMax', `tjMax minus its margin (${lim.tjMax - lim.tjMargin} °C) must be above the ambient (${lim.ambient} °C)`);
    }
  }
  for (const k of ['ceramicDerating', 'electrolyticDerating', 'powerDerating'] as const) {
    if (!isNum(lim[k]) || lim[k] <= 0 || lim[k] > 1) add(`limits.${k}`, `${k} must be above 0 and at most 1 (got ${String(lim[k])})`);
  }
  if (lim.inputRatingMargin !== undefined && (!isNum(lim.inputRatingMargin) || lim.inputRatingMargin < 0 || lim.inputRatingMargin > 1)) {
    add('limits.inputRatingMargin', `input rating margin must be from 0 to 1 (100 %) (got ${String(lim.inputRatingMargin)})`);
  }

  if (lim.windowMargin !== undefined && (!isNum(lim.windowMargin) || lim.windowMargin < 0 || lim.windowMargin >= 1)) {
    add('limits.windowMargin', `windowMargin is a share of the band's half-width, at least 0 and below 1 (got ${String(lim.windowMargin)})`);
  }

  for (const k of ['maxTurnsRatio', 'maxRectifierVoltage'] as const) {
    if (lim[k] !== undefined && (!isNum(lim[k]) || !(lim[k]! > 0))) add(`limits.${k}`, `${k} must be a positive number (got ${String(lim[k])})`);
  }

  const mm = lim.maxMagneticsPerIsolatedDomain;
  if (mm !== undefined && (!isNum(mm) || !Number.isInteger(mm) || mm < 1 || mm > 8)) {
    add('limits.maxMagneticsPerIsolatedDomain', `magnetics per isolated domain must be a whole number from 1 to 8 (got ${String(mm)})`);
  }

  // Planner preferences.
  const pref = req.preferences;
  const w = pref.weights ?? { loss: NaN, cost: NaN, parts: NaN };
  for (const k of ['loss', 'cost', 'parts'] as const) {
    if (!isNum(w[k]) || w[k] < 0) add(`preferences.weights.${k}`, 'weight must be a finite number ≥ 0');
  }
  if ([w.loss, w.cost, w.parts].every((x) => x === 0)) add('preferences.weights', 'at least one weight must be above 0');
  if (!Number.isInteger(pref.maxSecondaries) || pref.maxSecondaries < 1 || pref.maxSecondaries > 8) {
    add('preferences.maxSecondaries', `secondaries per magnetic must be a whole number from 1 to 8 (got ${String(pref.maxSecondaries)})`);
  }
  if (!Array.isArray(pref.allowedKinds) || pref.allowedKinds.length === 0) {
    add('preferences.allowedKinds', 'at least one stage kind must be allowed');
  } else {
    pref.allowedKinds.forEach((k, i) => {
      if (!STAGE_KINDS.includes(k)) add(`preferences.allowedKinds[${i}]`, `stage kind "${t(k)}" is not one of ${STAGE_KINDS.join(', ')}`);
      else if (pref.allowedKinds.indexOf(k) !== i) add(`preferences.allowedKinds[${i}]`, `stage kind "${k}" is listed twice`);
    });
  }
  if (!isNum(pref.switchingFrequency) || pref.switchingFrequency < 1e3 || pref.switchingFrequency > 50e6) {
    add('preferences.switchingFrequency', 'switching frequency must be between 1 kHz and 50 MHz');
  }
  if (!isNum(pref.budgetMs) || pref.budgetMs < 10 || pref.budgetMs > 3_600_000) {
    add('preferences.budgetMs', 'planner time budget must be between 10 ms and 1 h');
  }
  checkPhysicalRange(req, add);
  // Rails are loads grouped by voltage, domain, noise class and rail key (rails.ts).
  if (Array.isArray(req.loads) && req.loads.length > MAX_PLANNED_RAILS) {
    let rails = 0;
    try { rails = groupRails(req).length; } catch { rails = 0; }
    if (rails > MAX_PLANNED_RAILS) add('loads', `the loads make ${rails} rails; the planner plans up to ${MAX_PLANNED_RAILS} (join rails with a shared rail key, or plan part of the tree at a time)`);
  }
  return out;
}

/** Largest voltage (magnitude) a source, load or barrier may have in a board-level power tree. */
export const MAX_VOLTS = 1e3;
/** Largest current a load may draw in one mode, or a source may deliver. */
export const MAX_AMPS = 1e3;

/**
 * Values that are finite but physically absurd for the products this tool plans (a typed
 * unit slip such as "5k" for "5m", or a crafted 1e308): above 1 kV or 1 kA. The stage
 * models are not meant for them, and the planner would only blame on-time or E-series
 * values far downstream; say what is wrong where it was typed instead.
 */
function checkPhysicalRange(req: Requirements, add: (path: string, message: string) => void): void {
  // Prefixes stop at giga: beyond that, plain scientific notation reads better.
  const volts = (x: number) => (Math.abs(x) < 1e12 ? formatQuantity(x, 'voltage', 4) : `${x.toExponential(3)} V`);
  const amps = (x: number) => (Math.abs(x) < 1e12 ? formatQuantity(x, 'current', 4) : `${x.toExponential(3)} A`);
  const tooHigh = (x: unknown, max: number): x is number => isNum(x) && Math.abs(x) > max;
  req.sources.forEach((s, i) => {
    for (const k of ['vNom', 'vMin', 'vMax'] as const) {
      if (tooHigh(s[k], MAX_VOLTS)) add(`sources[${i}].${k}`, `${k} is ${volts(s[k])}, above the ${volts(MAX_VOLTS)} this tool plans for (check the unit)`);
    }
    if (tooHigh(s.currentLimit, MAX_AMPS)) add(`sources[${i}].currentLimit`, `current limit is ${amps(s.currentLimit)}, above the ${amps(MAX_AMPS)} this tool plans for (check the unit)`);
  });
  req.domains.forEach((d, i) => {
    if (tooHigh(d.workingVoltage, MAX_VOLTS)) add(`domains[${i}].workingVoltage`, `working voltage is ${volts(d.workingVoltage)}, above the ${volts(MAX_VOLTS)} this tool plans for (check the unit)`);
  });
  req.loads.forEach((l, i) => {
    if (tooHigh(l.voltage, MAX_VOLTS)) add(`loads[${i}].voltage`, `voltage is ${volts(l.voltage)}, above the ${volts(MAX_VOLTS)} this tool plans for (check the unit)`);
    if (tooHigh(l.rippleLimit, MAX_VOLTS)) add(`loads[${i}].rippleLimit`, `ripple limit is ${volts(l.rippleLimit)}, above ${volts(MAX_VOLTS)} (check the unit)`);
    for (const [modeId, a] of Object.entries(l.current ?? {})) {
      if (tooHigh(a, MAX_AMPS)) add(`loads[${i}].current.${modeId}`, `current is ${amps(a)}, above the ${amps(MAX_AMPS)} this tool plans for (check the unit)`);
    }
  });
  // Temperatures in °C: nothing is colder than absolute zero, and no board runs at 1000 °C.
  for (const k of ['ambient', 'tjMax'] as const) {
    const t = req.limits[k];
    if (isNum(t) && (t < -273.15 || t > 1000)) add(`limits.${k}`, `${k} is ${t} °C, outside −273.15 °C (absolute zero) to 1000 °C (check the unit)`);
  }
}
