/**
 * Project commands: demo, new, validate, import, export-json, summary.
 * Thin shells over the store, the JSON format and validation.
 */
import { openStore } from './open-project.ts';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { CliError, parseFlags, type CliCommand, type CliIo } from './command.ts';
import { formatQuantity, formatTolerance } from '../api/window-shared.ts';
import { CHEMISTRY_PRESETS, batteryRuntime, checkText, groupRails, railPeakCurrent, showText, usableEnergy, type Problem, type Requirements } from '../api/cli-shared.ts';
import { planningProblems } from '../api/plan-job.ts';
import { exportProjectJson, importProjectJson } from '../store/json-format.ts';
import { PROJECT_EXTENSION, ProjectStore, StoreError, hasProjectExtension, writeFileAtomic } from '../store/project-store.ts';
import { demoDocument } from '../store/demo.ts';
import { runtimeLines } from './plan.ts';

const ISOLATION_CAUTION =
  'Caution: isolated domains and mains-connected inputs can kill. Railwright records the isolation ' +
  'each barrier needs and certifies nothing; creepage, clearance, insulation and touch current follow ' +
  'the applicable safety standard and local codes, and a qualified engineer and the test lab decide.';

function needTarget(path: string | undefined, what: string, force: boolean): string {
  if (!path) throw new CliError(`missing ${what} (see --help)`, 2);
  if (!hasProjectExtension(path)) throw new CliError(`${path}: a project file name must end in ${PROJECT_EXTENSION}`, 2);
  refuseOverwrite(path, force);
  return path;
}

function refuseOverwrite(path: string, force: boolean): void {
  if (!existsSync(path)) return;
  if (statSync(path).isDirectory()) throw new CliError(`${path} is a folder`);
  if (!force) throw new CliError(`${path} already exists (use --force to overwrite it)`);
}


function problemLines(problems: Problem[]): string[] {
  return problems.map((p) => `  ${p.path}: ${p.message}`);
}

/** Save a new project file; `force` is the user's --force (replace an existing file). */
function saveNew(store: ProjectStore, path: string, force: boolean): void {
  try {
    store.save(path, { overwrite: force });
  } catch (e) {
    if (e instanceof StoreError) throw new CliError(e.message);
    throw e;
  } finally {
    store.close();
  }
}

/** The default part library, loaded only by the commands that need it. */
async function defaultLibrary() {
  const mod = await import('../api/default-library.ts');
  return mod.defaultLibrary();
}

const demo: CliCommand = {
  name: 'demo',
  summary: 'create the demonstration project (an invented scenario) as a project file',
  usage: [
    `Usage: railwright demo <file${PROJECT_EXTENSION}> [--force]`,
    '',
    'Writes the invented demonstration project: a field transmitter with a wide-range DC input,',
    'an isolated analog front end and an isolated fieldbus interface, with the default part',
    'library (invented cost estimates).',
    '  --force   overwrite the file if it exists',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { force: 'boolean' });
    if (positional.length > 1) throw new CliError('too many arguments (see --help)', 2);
    const target = needTarget(positional[0], 'project file', flags.force === true);
    // Same content as the window's demo: the invented project with the default part library.
    const doc = demoDocument();
    if (!doc.library?.length) doc.library = await defaultLibrary();
    saveNew(ProjectStore.fromDocument(doc), target, flags.force === true);
    io.out(`wrote ${target} (invented demonstration project)`);
    return 0;
  },
};

const newCmd: CliCommand = {
  name: 'new',
  summary: 'create an empty project file (one source, one domain, one mode)',
  usage: [
    `Usage: railwright new <file${PROJECT_EXTENSION}> [--name <text>] [--force]`,
    '',
    'Creates a project with a 12 V input, one non-isolated domain, one operating mode and the',
    'default part library (invented cost estimates), ready to edit.',
    '  --name    project name (default "Untitled project")',
    '  --force   overwrite the file if it exists',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { force: 'boolean', name: 'string' });
    if (positional.length > 1) throw new CliError('too many arguments (see --help)', 2);
    const target = needTarget(positional[0], 'project file', flags.force === true);
    const store = ProjectStore.create();
    try {
      store.setLibrary(await defaultLibrary());
    } catch (e) {
      store.close();
      throw e;
    }
    if (typeof flags.name === 'string') {
      if (flags.name.trim() === '') { store.close(); throw new CliError('--name must not be empty', 2); }
      const bad = checkText(flags.name, 'name');
      if (bad) { store.close(); throw new CliError(`--name: ${bad}`, 2); }
      const req = store.getRequirements();
      req.meta.name = flags.name;
      store.setRequirements(req, { keepRevision: true });
    }
    saveNew(store, target, flags.force === true);
    io.out(`wrote ${target}`);
    return 0;
  },
};

/** Requirements of a project file or a JSON document, for validate and summary. */
function loadRequirements(path: string | undefined, io: CliIo): Requirements {
  if (!path) throw new CliError('missing project file (see --help)', 2);
  if (path.toLowerCase().endsWith('.json')) {
    const text = readText(path);
    const r = importProjectJson(text);
    if (!r.ok) {
      io.err(`${path}: ${r.problems.length} problem(s):`);
      for (const l of problemLines(r.problems)) io.err(l);
      throw new CliError(`${path} is not a valid project document`);
    }
    return r.doc.requirements;
  }
  const store = openStore(path);
  try {
    return store.getRequirements();
  } finally {
    store.close();
  }
}

function readText(path: string): string {
  try {
    if (statSync(path).size > 256 * 1024 * 1024) throw new CliError(`${path} is larger than 256 MiB`);
    return readFileSync(path, 'utf8');
  } catch (e) {
    if (e instanceof CliError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(code === 'ENOENT' ? `${path} does not exist` : `${path} cannot be read (${code ?? (e as Error).message})`);
  }
}

const validate: CliCommand = {
  name: 'validate',
  summary: 'check a project (file or JSON document) and list every problem',
  usage: [
    `Usage: railwright validate <file${PROJECT_EXTENSION}|file.json>`,
    '',
    'Prints each problem as "path: reason". Exit status 0 when there are none, 1 otherwise.',
  ].join('\n'),
  async run(args, io) {
    const { positional } = parseFlags(args, {});
    if (positional.length > 1) throw new CliError('too many arguments (see --help)', 2);
    const req = loadRequirements(positional[0], io);
    const problems = planningProblems(req);
    if (problems.length === 0) {
      io.out(`${positional[0]}: no problems (${req.loads.length} loads, ${groupRails(req).length} rails)`);
      return 0;
    }
    io.out(`${positional[0]}: ${problems.length} problem(s):`);
    for (const l of problemLines(problems)) io.out(l);
    return 1;
  },
};

const importCmd: CliCommand = {
  name: 'import',
  summary: 'make a project file from a JSON project document',
  usage: [
    `Usage: railwright import <in.json> <file${PROJECT_EXTENSION}> [--force]`,
    '',
    'Quantities may be SI numbers or engineering notation ("3V3", "250m", "±5%").',
    'Every structural problem is listed with its path and the file is not written; semantic',
    'problems (see validate) are listed as warnings and the file is written.',
    '  --force   overwrite the project file if it exists',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { force: 'boolean' });
    if (positional.length !== 2) throw new CliError('expected <in.json> and <project file> (see --help)', 2);
    const [input, out] = positional as [string, string];
    const text = readText(input);
    const target = needTarget(out, 'project file', flags.force === true);
    const r = importProjectJson(text);
    if (!r.ok) {
      io.err(`${input}: ${r.problems.length} problem(s):`);
      for (const l of problemLines(r.problems)) io.err(l);
      throw new CliError(`${input} was not imported`);
    }
    let store: ProjectStore;
    try {
      store = ProjectStore.fromDocument(r.doc);
    } catch (e) {
      if (e instanceof StoreError) throw new CliError(e.message);
      throw e;
    }
    saveNew(store, target, flags.force === true);
    io.out(`wrote ${target}`);
    if (r.problems.length) {
      io.err(`warning: ${r.problems.length} problem(s) to fix (railwright validate ${target}):`);
      for (const l of problemLines(r.problems)) io.err(l);
    }
    return 0;
  },
};

const exportJson: CliCommand = {
  name: 'export-json',
  summary: 'write a project file as a JSON project document (stdout without <out.json>)',
  usage: [
    `Usage: railwright export-json <file${PROJECT_EXTENSION}> [out.json] [--force]`,
    '',
    'Writes the whole project (requirements, saved plan, part library) in SI units.',
    '  --force   overwrite out.json if it exists',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { force: 'boolean' });
    if (positional.length < 1 || positional.length > 2) throw new CliError('expected <project file> [out.json] (see --help)', 2);
    const [input, out] = positional as [string, string | undefined];
    if (out) refuseOverwrite(out, flags.force === true);
    const store = openStore(input);
    let text: string;
    try {
      text = exportProjectJson(store.toDocument());
    } finally {
      store.close();
    }
    if (!out) {
      io.out(text.trimEnd());
      return 0;
    }
    try {
      writeFileAtomic(out, Buffer.from(text, 'utf8'), { replace: flags.force === true });
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'EEXIST') throw new CliError(`${out} already exists (use --force to overwrite it)`);
      throw new CliError(`could not write ${out}: ${(e as Error).message}`);
    }
    io.out(`wrote ${out}`);
    return 0;
  },
};

function pad(s: string, n: number): string {
  return s.length >= n ? s : s + ' '.repeat(n - s.length);
}
function lpad(s: string, n: number): string {
  return s.length >= n ? s : ' '.repeat(n - s.length) + s;
}

/** The requirements as text: sources, domains, modes, rails with loads and currents. */
export function summaryText(req: Requirements): string[] {
  const q = formatQuantity;
  // Names from the file are shown escaped, each on its line (engine/text-rules.ts via api/cli-shared.ts).
  const nm = (x: string) => showText(String(x));
  const lines: string[] = [];
  lines.push(`${nm(req.meta.name)} (revision ${req.meta.revision})`);
  if (req.meta.description) lines.push(showText(String(req.meta.description), { keepLineFeeds: true }));
  lines.push('', 'Sources');
  for (const s of req.sources) {
    lines.push(`  ${pad(nm(s.name), 28)} ${q(s.vNom, 'voltage')} (${q(s.vMin, 'voltage')} to ${q(s.vMax, 'voltage')}), limit ${q(s.currentLimit, 'current')}`);
    if (s.battery) {
      const b = s.battery;
      const e = usableEnergy(b);
      lines.push(`  ${pad('', 28)} battery: ${b.cells} × ${CHEMISTRY_PRESETS[b.chemistry].label}${b.curve ? ' (own curve)' : ' (preset curve, from memory)'}, ${b.capacity} A·h, ends at ${q(b.endVoltage, 'voltage')}: ${e.wh.toFixed(2)} Wh usable, mean ${q(e.meanVoltage, 'voltage')}`);
    }
  }
  lines.push('', 'Domains');
  for (const d of req.domains) {
    const iso = d.isolation === 'none' ? 'not isolated' : `${d.isolation} isolation, working voltage ${q(d.workingVoltage, 'voltage')}`;
    lines.push(`  ${pad(nm(d.name), 28)} ${iso}`);
  }
  lines.push('', 'Operating modes');
  for (const m of req.modes) lines.push(`  ${pad(nm(m.name), 28)} ${q(m.share, 'ratio')} of the time`);
  const rails = groupRails(req);
  const w = 10;
  lines.push('', `Rails (${rails.length}) and their loads; current per mode: ${req.modes.map((m) => nm(m.name)).join(' / ')}`);
  const byId = new Map(req.loads.map((l) => [l.id, l]));
  const nw = Math.max(12, ...req.loads.map((l) => nm(l.name).length + 2));
  const power = new Map(req.modes.map((m) => [m.id, 0]));
  for (const r of rails) {
    lines.push(`  ${pad(nm(r.name), 34)} ${q(r.voltage, 'voltage', 4)} ${formatTolerance(r.tolerance)}, ripple ≤ ${q(r.rippleLimit, 'voltage')}, ${r.noiseClass}, peak ${q(railPeakCurrent(r), 'current')}`);
    for (const id of r.loadIds) {
      const l = byId.get(id)!;
      lines.push(`      ${pad(nm(l.name), nw)}${req.modes.map((m) => lpad(q(l.current[m.id] ?? 0, 'current'), w)).join('')}`);
    }
    lines.push(`      ${pad('rail total', nw)}${req.modes.map((m) => lpad(q(r.current[m.id] ?? 0, 'current'), w)).join('')}`);
    for (const m of req.modes) power.set(m.id, power.get(m.id)! + Math.abs(r.voltage) * (r.current[m.id] ?? 0));
  }
  lines.push('', `Load power per mode (before conversion losses): ${req.modes.map((m) => `${nm(m.name)} ${q(power.get(m.id)!, 'power')}`).join(', ')}`);
  const batteries = req.sources.filter((s) => s.battery);
  if (batteries.length === 1) {
    // One battery feeds everything: its runtime at the load power is an upper bound (the
    // plan's roll-up, which counts the conversion losses, gives the planned runtime).
    const s = batteries[0]!;
    const rt = batteryRuntime(s.id, s.battery!, req.modes, (id) => power.get(id)!);
    const h = (x: number) => (Number.isFinite(x) ? `${x.toFixed(x < 10 ? 2 : 1)} h` : 'unlimited (no load)');
    lines.push(`Battery runtime at the load power, before conversion losses (an upper bound): mode mix ${h(rt.mixHours)}; ${rt.perMode.map((m) => `${m.modeName} ${h(m.hours)}`).join(', ')}`);
  } else if (batteries.length > 1) {
    lines.push('Battery runtime: several battery sources; the plan\'s roll-up gives each one\'s runtime');
  }
  const problems = planningProblems(req);
  if (problems.length) lines.push(`${problems.length} problem(s): run railwright validate for the list`);
  if (req.domains.some((d) => d.isolation !== 'none')) lines.push('', ISOLATION_CAUTION);
  return lines;
}

const summary: CliCommand = {
  name: 'summary',
  summary: 'print the requirements: sources, domains, modes, rails with loads and currents',
  usage: [
    `Usage: railwright summary <file${PROJECT_EXTENSION}|file.json>`,
    '',
    'Loads are grouped into rails as the planner sees them (same domain, voltage and noise',
    'class, or the same manual rail key).',
  ].join('\n'),
  async run(args, io) {
    const { positional } = parseFlags(args, {});
    if (positional.length > 1) throw new CliError('too many arguments (see --help)', 2);
    const req = loadRequirements(positional[0], io);
    for (const l of summaryText(req)) io.out(l);
    // A project file with a current saved plan: the planned runtime (its roll-up, losses included).
    if (req.sources.some((s) => s.battery) && positional[0] && !positional[0].toLowerCase().endsWith('.json')) {
      const store = openStore(positional[0]);
      try {
        const saved = store.getPlanResult();
        if (saved?.result.best && !saved.stale) for (const l of runtimeLines(req, saved.result.best)) io.out(l);
        else io.out(saved?.result.best ? 'The saved plan is older than the requirements: plan again for the planned runtime' : 'No saved plan: railwright plan gives the runtime with the conversion losses');
      } finally {
        store.close();
      }
    }
    return 0;
  },
};

export const projectCommands: CliCommand[] = [demo, newCmd, validate, importCmd, exportJson, summary];
