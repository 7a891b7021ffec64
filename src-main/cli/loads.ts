/**
 * `railwright import-loads`: a load list from CSV or XLSX into a project file, through the same
 * reader, column mapping and cell rules as the window's import dialog (api/load-import.ts).
 */
import { readFileSync, statSync } from 'node:fs';
import { CliError, parseFlags, type CliCommand } from './command.ts';
import { openStore } from './open-project.ts';
import { showText, type Requirements } from '../api/cli-shared.ts';
import { IMPORT_MAX_BYTES, applyImport, columnLetter, describeBad, guessMapping, previewImport } from '../api/load-import.ts';
import { ApiFailure } from '../api/registry.ts';
import { SaveRefused, StoreError } from '../store/project-store.ts';
import type { LoadImportMapping } from '../api/contract.ts';

/** Field names accepted in --map, besides the target keys themselves. */
const ALIASES: Record<string, string> = {
  name: 'name', domain: 'domainId', voltage: 'voltage', current: 'current:*', tolerance: 'tolerance',
  ripple: 'rippleLimit', noise: 'noiseClass', 'rail-key': 'railKey', skip: '',
};

/** `A=name,C=voltage,D=current:Run`: column letters (or 1-based numbers) to fields. */
export function parseMap(text: string, width: number, req: Requirements): (string | null)[] {
  const cols: (string | null)[] = Array.from({ length: width }, () => null);
  for (const part of text.split(',').map((p) => p.trim()).filter(Boolean)) {
    const m = /^([A-Za-z]{1,2}|\d{1,3})\s*=\s*(.+)$/.exec(part);
    if (!m) throw new CliError(`--map: "${showText(part)}" is not COLUMN=FIELD (e.g. A=name,C=voltage,D=current)`, 2);
    const j = /^\d+$/.test(m[1]!) ? Number(m[1]) - 1 : [...m[1]!.toUpperCase()].reduce((a, c) => a * 26 + c.charCodeAt(0) - 64, 0) - 1;
    let f = m[2]!.trim();
    if (f.toLowerCase().startsWith('current:')) {
      const mode = f.slice(8);
      const hit = req.modes.find((x) => x.id === mode || x.name.toLowerCase() === mode.toLowerCase());
      if (!hit) throw new CliError(`--map: no operating mode "${showText(mode)}" (have: ${req.modes.map((x) => showText(x.name)).join(', ')})`, 2);
      f = `current:${hit.id}`;
    } else if (f.toLowerCase() in ALIASES) f = ALIASES[f.toLowerCase()]!;
    while (cols.length <= j) cols.push(null);
    cols[j] = f === '' ? null : f;
  }
  return cols;
}

const importLoads: CliCommand = {
  name: 'import-loads',
  summary: 'add the loads of a CSV or XLSX load list to a project file',
  usage: [
    'Usage: railwright import-loads <file.rwproj> <list.csv|list.xlsx> [--sheet NAME] [--header-row N]',
    '                               [--map A=name,C=voltage,D=current] [--replace] [--only-good-rows] [--dry-run]',
    '',
    'Reads the list (CSV: comma, semicolon or tab separated, RFC 4180 quoting; XLSX: the first sheet',
    'or --sheet), guesses which column fills which field of a load from the header (a unit in the',
    'header, "Current (mA)", applies to bare numbers below it), and checks every cell with the rules',
    'of the grid. Every bad cell is listed by row and column; then nothing is written unless',
    '--only-good-rows leaves those rows out. The project file is saved in place (atomically).',
    '  --map           COLUMN=FIELD pairs replacing the guess; fields: name, domain, voltage, current',
    '                  (every mode), current:<mode>, tolerance, ripple, noise, rail-key, skip',
    '  --header-row N  the header is on line N (1-based; default: guessed)',
    '  --replace       replace the project\'s loads instead of adding to them',
    '  --dry-run       list what would be imported, write nothing',
  ].join('\n'),
  async run(args, io) {
    const { flags, positional } = parseFlags(args, { sheet: 'string', 'header-row': 'string', map: 'string', replace: 'boolean', 'only-good-rows': 'boolean', 'dry-run': 'boolean' });
    if (positional.length !== 2) throw new CliError('expected <project file> and <load list> (see --help)', 2);
    const [projectPath, listPath] = positional as [string, string];
    let size: number;
    try { size = statSync(listPath).size; } catch { throw new CliError(`${listPath}: no such file`); }
    if (size > IMPORT_MAX_BYTES) throw new CliError(`${listPath}: larger than ${IMPORT_MAX_BYTES / 1048576} MiB`);
    const store = openStore(projectPath);
    try {
      const req = store.getRequirements();
      const { readLoadFile } = await import('../api/imports.ts');
      const { Session } = await import('../api/session.ts');
      const s = new Session({ host: 'test', userDataDir: null });
      s.requirements = req;
      let file;
      try {
        file = await readLoadFile(s, listPath, readFileSync(listPath), typeof flags.sheet === 'string' ? flags.sheet : undefined);
      } catch (e) {
        if (e instanceof ApiFailure) throw new CliError(`${listPath}: ${showText(e.message)}`);
        throw e;
      }
      const guess = file.preview.mapping;
      const headerRow = typeof flags['header-row'] === 'string' ? Number(flags['header-row']) - 1 : guess.headerRow;
      if (!Number.isInteger(headerRow) || headerRow < 0 || headerRow >= file.rows.length) throw new CliError(`--header-row: expected a line number from 1 to ${file.rows.length}`, 2);
      const width = Math.max(...file.rows.map((r) => r.length), 0);
      const mapping: LoadImportMapping = {
        headerRow,
        columns: typeof flags.map === 'string' ? parseMap(flags.map, width, req) : headerRow === guess.headerRow ? guess.columns : guessMapping(file.rows.slice(headerRow), req).columns,
        replace: flags.replace === true,
      };
      const p = previewImport(req, file.rows, mapping, file.decimalComma);
      const header = file.rows[headerRow] ?? [];
      io.out(`${showText(listPath)}: ${file.format === 'xlsx' ? `sheet "${showText(file.sheet ?? '')}"` : 'CSV'}, header on line ${headerRow + 1}`);
      mapping.columns.forEach((k, j) => {
        if (k) io.out(`  column ${columnLetter(j)} "${showText(header[j] ?? '')}" → ${showText(p.targets.find((t) => t.key === k)?.label ?? k)}`);
      });
      for (const n of p.notes) io.out(`note: ${showText(n)}`);
      if (p.problems.length) throw new CliError(`nothing imported: ${p.problems.map((x) => showText(x)).join('; ')}`);
      io.out(`${p.total} row(s), ${p.good} without a bad cell`);
      for (const b of p.bad) io.err(`  ${showText(describeBad(b))}`);
      if (p.bad.length && flags['only-good-rows'] !== true) throw new CliError(`nothing imported: ${p.bad.length} bad cell(s) (fix them, or pass --only-good-rows)`);
      if (flags['dry-run'] === true) { io.out('dry run: nothing written'); return 0; }
      let r;
      try {
        r = applyImport(req, file.rows, mapping, { onlyGoodRows: flags['only-good-rows'] === true, decimalComma: file.decimalComma });
        store.setRequirements(r.requirements);
        store.save(projectPath);
      } catch (e) {
        if (e instanceof ApiFailure || e instanceof SaveRefused || e instanceof StoreError) throw new CliError(showText(e.message));
        throw e;
      }
      io.out(`imported ${r.imported} load(s)${r.skipped ? `, left out ${r.skipped} row(s) with bad cells` : ''} into ${showText(projectPath)}`);
      return 0;
    } finally {
      store.close();
    }
  },
};

export const loadCommands: CliCommand[] = [importLoads];
