/**
 * Column definitions of the editable requirement tables. Plain data shared by the handlers
 * (which parse what the user typed) and the window (which draws the grids), so both agree
 * on every column's key, quantity kind and unit.
 */
import type { QuantityKind } from '../engine/units.ts';
import type { TableName } from './contract.ts';
import { STAGE_KINDS } from '../engine/model.ts';
import { KIND_NAMES } from '../engine/stages/kind-names.ts';

export type ColumnKind =
  | { type: 'text'; optional?: boolean }
  | { type: 'quantity'; quantity: QuantityKind; signed?: boolean; min?: number; max?: number }
  | { type: 'tolerance' }
  /** A fraction typed as `0.3` or `30%`. */
  | { type: 'fraction'; min: number; max: number }
  | { type: 'integer'; min: number; max: number }
  | { type: 'number'; min: number; max: number; unit: string }
  | { type: 'enum'; options: readonly string[] | 'domains' }
  /**
   * A list of options typed comma-separated ("buck, LDO, coupled-winding buck"), at least one,
   * each once. An option is typed as its key or its label; the grid shows each label.
   */
  | { type: 'list'; options: readonly string[]; labels?: Readonly<Record<string, string>> };

/** A stage kind as the allowed-kinds cell shows it: its trade word (stages/kind-names.ts). */
const KIND_LABELS: Readonly<Record<string, string>> = Object.fromEntries(STAGE_KINDS.map((k) => [k, KIND_NAMES[k].noun]));

export interface ColumnDef {
  key: string;
  label: string;
  kind: ColumnKind;
  width: number;
  hint: string;
}

const q = (quantity: QuantityKind, extra: { signed?: boolean; min?: number; max?: number } = {}): ColumnKind =>
  ({ type: 'quantity', quantity, ...extra });

export const TABLE_COLUMNS: Record<Exclude<TableName, 'library'>, ColumnDef[]> = {
  sources: [
    { key: 'name', label: 'Name', kind: { type: 'text' }, width: 160, hint: 'what feeds the board' },
    { key: 'vNom', label: 'V nominal', kind: q('voltage', { min: 0, max: 1000 }), width: 90, hint: 'e.g. 24 or 24V' },
    { key: 'vMin', label: 'V min', kind: q('voltage', { min: 0, max: 1000 }), width: 90, hint: 'lowest input' },
    { key: 'vMax', label: 'V max', kind: q('voltage', { min: 0, max: 1000 }), width: 90, hint: 'highest input' },
    { key: 'currentLimit', label: 'I limit', kind: q('current', { min: 0, max: 1000 }), width: 90, hint: 'largest current the source may give' },
  ],
  domains: [
    { key: 'name', label: 'Name', kind: { type: 'text' }, width: 160, hint: 'ground domain' },
    { key: 'isolation', label: 'Isolation', kind: { type: 'enum', options: ['none', 'functional', 'basic', 'reinforced'] }, width: 110, hint: 'none = same ground as the source' },
    { key: 'workingVoltage', label: 'Working V', kind: q('voltage', { min: 0, max: 10000 }), width: 100, hint: 'across the barrier' },
  ],
  modes: [
    { key: 'name', label: 'Name', kind: { type: 'text' }, width: 160, hint: 'operating mode' },
    { key: 'share', label: 'Share of time', kind: { type: 'fraction', min: 0, max: 1 }, width: 110, hint: 'e.g. 70% or 0.7' },
  ],
  loads: [
    { key: 'name', label: 'Name', kind: { type: 'text' }, width: 210, hint: 'what is powered' },
    { key: 'domainId', label: 'Domain', kind: { type: 'enum', options: 'domains' }, width: 150, hint: 'ground domain' },
    { key: 'voltage', label: 'Voltage', kind: q('voltage', { signed: true, min: -1000, max: 1000 }), width: 80, hint: 'signed, e.g. 3V3 or -12' },
    { key: 'tolerance', label: 'Tolerance', kind: { type: 'tolerance' }, width: 80, hint: 'e.g. ±5%' },
    { key: 'rippleLimit', label: 'Ripple p-p', kind: q('voltage', { min: 0, max: 100 }), width: 80, hint: 'e.g. 30m' },
    { key: 'noiseClass', label: 'Noise class', kind: { type: 'enum', options: ['rugged', 'standard', 'quiet'] }, width: 90, hint: 'quiet for analog and references' },
    { key: 'railKey', label: 'Rail key', kind: { type: 'text', optional: true }, width: 90, hint: 'same key = same rail (override)' },
  ],
  limits: [
    { key: 'ambient', label: 'Ambient', kind: q('temperature', { signed: true, min: -60, max: 150 }), width: 90, hint: 'e.g. 55' },
    { key: 'tjMax', label: 'Tj max', kind: q('temperature', { signed: true, min: 0, max: 200 }), width: 90, hint: 'no part may exceed' },
    { key: 'tjMargin', label: 'Tj margin', kind: { type: 'number', min: 0, max: 100, unit: 'K' }, width: 90, hint: 'kept below Tj max' },
    { key: 'ceramicDerating', label: 'Ceramic capacitor voltage derating', kind: { type: 'fraction', min: 0.1, max: 1 }, width: 120, hint: 'largest share of the rated voltage a ceramic capacitor may see' },
    { key: 'electrolyticDerating', label: 'Electrolytic capacitor voltage derating', kind: { type: 'fraction', min: 0.1, max: 1 }, width: 120, hint: 'largest share of the rated voltage an electrolytic capacitor may see' },
    { key: 'powerDerating', label: 'Power derating', kind: { type: 'fraction', min: 0.1, max: 1 }, width: 90, hint: 'largest share of the rated power a resistor or package may dissipate' },
  ],
  preferences: [
    { key: 'switchingFrequency', label: 'f switching', kind: q('frequency', { min: 10e3, max: 10e6 }), width: 100, hint: 'e.g. 400k' },
    { key: 'maxSecondaries', label: 'Max secondaries', kind: { type: 'integer', min: 0, max: 6 }, width: 110, hint: 'per coupled-winding magnetic' },
    { key: 'weights.loss', label: 'Weight: loss', kind: { type: 'number', min: 0, max: 100, unit: '' }, width: 90, hint: 'objective weight' },
    { key: 'weights.cost', label: 'Weight: cost', kind: { type: 'number', min: 0, max: 100, unit: '' }, width: 90, hint: 'objective weight' },
    { key: 'weights.parts', label: 'Weight: parts', kind: { type: 'number', min: 0, max: 100, unit: '' }, width: 90, hint: 'objective weight' },
    { key: 'allowedKinds', label: 'Allowed stage kinds', kind: { type: 'list', options: STAGE_KINDS, labels: KIND_LABELS }, width: 300, hint: `comma-separated: ${STAGE_KINDS.map((k) => KIND_LABELS[k]).join(', ')}` },
    { key: 'budgetMs', label: 'Time budget (ms)', kind: { type: 'integer', min: 100, max: 600000 }, width: 100, hint: 'milliseconds the planner may search' },
  ],
};

/** Column of a load's current in one mode. */
export const currentColumnKey = (modeId: string) => `current:${modeId}`;

export const TABLE_TITLES: Record<TableName, string> = {
  sources: 'Sources',
  domains: 'Domains',
  modes: 'Operating modes',
  loads: 'Loads',
  limits: 'Design limits',
  preferences: 'Planner settings',
  library: 'Part library',
};
