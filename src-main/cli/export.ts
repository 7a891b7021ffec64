/**
 * `railwright export` (BOM, tree, report, netlists, magnetic specifications, library CSV)
 * and `railwright library` (import/export the project's part library as CSV). Thin shells
 * over the store and src-main/api (the planning job, the exports written to files, the
 * library CSV).
 */
import { openStore, projectLibrary } from './open-project.ts';
import { readFileSync } from 'node:fs';
import { CliError, parseFlags, type CliCommand, type CliIo } from './command.ts';
import { PROJECT_EXTENSION, ProjectStore, StoreError } from '../store/project-store.ts';
import type { ElkLike, PlanResult } from '../api/cli-shared.ts';
import { RollupError } from '../api/cli-shared.ts';
import { checkTargets, existsMessage, writeExportFiles, writeFiles, ExportError, TargetError, TargetExists, type ExportTargets } from '../api/export-files.ts';
import { existsSync } from 'node:fs';
import { defaultLibrary } from '../api/default-library.ts';
import { libraryCsv, libraryFromCsv } from '../api/library-csv.ts';
import { planningProblems, planWithLibrary } from '../api/plan-job.ts';

const CAUTION =
  'Caution: mains and isolation barriers can kill; creepage, clearance and touch current follow the applicable ' +
  'safety standard and local codes; a qualified engineer and the test lab decide. The tool certifies nothing; ' +
  'costs are estimates (invented in the default library).';


async function elk(): Promise<ElkLike> {
  const mod = await import('elkjs/lib/elk.bundled.js');
  return new mod.default() as unknown as ElkLike;
}

const exportCmd: CliCommand = {
  name: 'export',
  summary: 'write the BOM, tree drawing, design report, SPICE netlists, magnetic specifications or library CSV',
  usage: [
    `Usage: railwright export <project${PROJECT_EXTENSION}> [options]`,
    '',
    '  --bom <file.csv|file.xlsx>   bill of materials (costs are estimates)',
    '  --tree <file.svg|file.pdf>   the power tree drawing',
    '  --report <file.pdf>          design report: requirements, tree, reasons, roll-up, thermal, windows, BOM, cautions',
    '  --netlists <folder>          one SPICE netlist (.cir, for ngspice -b) per switching stage',
    '  --magnetics <folder>         one specification sheet (.md) per custom coupled-winding magnetic',
    '  --library-csv <file.csv>     the project part library as CSV',
    '  --mode <name or id>          operating mode the drawing shows (default: the heaviest)',
    '  --force                      replace files that already exist (without it an existing',
    '                               file is refused and nothing is written)',
    '',
    'Uses the plan saved in the project; when there is none or it is stale, plans first (the',
    'project file is not changed) and says so.',
    '',
    CAUTION,
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, {
      bom: 'string', tree: 'string', report: 'string', netlists: 'string', magnetics: 'string', 'library-csv': 'string', mode: 'string',
      force: 'boolean',
    });
    const force = flags.force === true;
    if (positional.length !== 1) throw new CliError('give exactly one project file (see --help)', 2);
    const targets: ExportTargets = {};
    for (const k of ['bom', 'tree', 'report', 'netlists', 'magnetics'] as const) if (typeof flags[k] === 'string') targets[k] = flags[k] as string;
    const libCsv = flags['library-csv'] as string | undefined;
    if (Object.keys(targets).length === 0 && !libCsv) throw new CliError('nothing to export: give at least one of --bom, --tree, --report, --netlists, --magnetics, --library-csv', 2);
    try {
      checkTargets(targets, force);
      if (libCsv !== undefined && !/\.csv$/i.test(libCsv)) throw new TargetError(`--library-csv ${libCsv}: the name must end in .csv`);
      if (libCsv !== undefined && !force && existsSync(libCsv)) throw new TargetExists(existsMessage('--library-csv', libCsv));
    } catch (e) {
      if (e instanceof TargetError) throw new CliError(e.message, e instanceof TargetExists ? 1 : 2);
      throw e;
    }
    const store = openStore(positional[0]);
    try {
      const req = store.getRequirements();
      // The same gate as `plan`: no drawing, BOM or report of requirements it refuses.
      const problems = Object.keys(targets).length ? planningProblems(req) : [];
      if (problems.length) {
        io.err('the requirements have problems; fix them before exporting (nothing was written):');
        for (const p of problems) io.err(`  ${p.path}: ${p.message}`);
        return 1;
      }
      // The library CSV is written with the other files, after every target was checked.
      const extra = libCsv
        ? [{ option: '--library-csv', path: libCsv, bytes: new TextEncoder().encode(libraryCsv(store.getLibrary().length ? store.getLibrary() : defaultLibrary())) }]
        : [];
      if (Object.keys(targets).length === 0) {
        for (const line of writeFiles(extra, force)) io.out(line);
        return 0;
      }
      const library = projectLibrary(store, io);
      const saved = store.getPlanResult();
      let result: PlanResult;
      let replanned = false;
      if (saved && !saved.stale && saved.result.best) {
        result = saved.result;
      } else {
        io.err(saved ? (saved.stale ? 'the saved plan is stale (the requirements changed since); planning again for this export' : 'the saved plan has no feasible tree; planning again for this export')
          : 'the project has no saved plan; planning it for this export');
        result = await planWithLibrary(req, library);
        replanned = true;
      }
      const modeFlag = flags.mode as string | undefined;
      let modeId: string | undefined;
      if (modeFlag !== undefined) {
        const m = req.modes.find((x) => x.id === modeFlag || x.name === modeFlag);
        if (!m) throw new CliError(`--mode ${modeFlag}: no such operating mode (${req.modes.map((x) => x.name).join(', ')})`, 2);
        modeId = m.id;
      }
      const { lines, notes } = await writeExportFiles({ req, result, library, elk: await elk(), modeId, replanned, targets, force, extra });
      for (const line of lines) io.out(line);
      if (notes.partsWithoutRow) io.err(`note: ${notes.partsWithoutRow} part(s) have no fitting library row; they are listed without cost`);
      for (const o of notes.sourceOverloads) io.err(`note: ${o}`);
      const bad = notes.windowsOutside;
      if (bad.length) io.err(`note: ${bad.length} window(s) fall outside their tolerance: ${bad.join(', ')}`);
      io.err(CAUTION);
      return 0;
    } catch (e) {
      if (e instanceof ExportError || e instanceof RollupError || e instanceof TargetError) throw new CliError(e.message);
      throw e;
    } finally {
      store.close();
    }
  },
};

const libraryCmd: CliCommand = {
  name: 'library',
  summary: "import or export a project's part library as CSV",
  usage: [
    `Usage: railwright library <project${PROJECT_EXTENSION}> --import <file.csv> | --export <file.csv> [--force]`,
    '',
    '  --force   with --export: replace the CSV file if it exists (otherwise it is refused)',
    '',
    'CSV columns: id, class, name, cost_estimate, cost_note, params ("key=value; key=value",',
    'numbers in base SI units). An import replaces the whole library and is refused, with every',
    'problem named by row and column, unless every row is valid; the project is then unchanged.',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { import: 'string', export: 'string', force: 'boolean' });
    if (positional.length !== 1) throw new CliError('give exactly one project file (see --help)', 2);
    const imp = flags.import as string | undefined;
    const exp = flags.export as string | undefined;
    if ((imp === undefined) === (exp === undefined)) throw new CliError('give exactly one of --import <file.csv> or --export <file.csv>', 2);
    if (imp !== undefined && flags.force === true) throw new CliError('--force goes with --export (an import changes the project file itself)', 2);
    if (exp !== undefined && !/\.csv$/i.test(exp)) throw new CliError(`--export ${exp}: the name must end in .csv`, 2);
    if (exp !== undefined && flags.force !== true && existsSync(exp)) throw new CliError(existsMessage('--export', exp));
    const store = openStore(positional[0]);
    try {
      if (exp !== undefined) {
        const rows = store.getLibrary();
        try {
          writeFiles([{ option: '--export', path: exp, bytes: new TextEncoder().encode(libraryCsv(rows.length ? rows : defaultLibrary())) }], flags.force === true);
        } catch (e) {
          if (e instanceof TargetError) throw new CliError(e.message);
          throw e;
        }
        io.out(`wrote ${exp} (${rows.length ? rows.length : 'default library, ' + defaultLibrary().length} rows)`);
        return 0;
      }
      let text: string;
      try {
        text = readFileSync(imp!, 'utf8');
      } catch (e) {
        throw new CliError(`--import ${imp}: cannot read the file (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
      }
      const r = libraryFromCsv(text);
      if (!r.ok && 'csvError' in r) throw new CliError(`--import ${imp}: ${r.csvError}; the project is unchanged`);
      if (!r.ok) {
        for (const p of r.problems.slice(0, 50)) io.err(`  ${p}`);
        throw new CliError(`--import ${imp}: ${r.problems.length} problem(s); the project is unchanged`);
      }
      try {
        store.setLibrary(r.rows);
        store.save();
      } catch (e) {
        if (e instanceof StoreError) throw new CliError(e.message);
        throw e;
      }
      io.out(`imported ${r.rows.length} part rows into ${positional[0]}`);
      return 0;
    } finally {
      store.close();
    }
  },
};

export const exportCommands: CliCommand[] = [exportCmd, libraryCmd];
