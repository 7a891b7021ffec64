/**
 * The stage kinds, registered in one list. Each kind's folder provides everything the rest of
 * the program takes from a kind, and its entry here names it: designer, evaluator, names and
 * drawing colour, mode dependence, design fields, window entry, BOM parts and, if it
 * switches, netlist writer. stages/index.ts, windows.ts, stage-json.ts, library.ts
 * (partsForStage), layout.ts, the roll-up, the planner's names and reasons, the netlist
 * export, the CLI and (through api/window-shared.ts) the window dispatch through this table
 * (DEVELOPERS.md, "How to add a stage model").
 *
 * Kind modules import modules that import this one (windows.ts, library.ts): the entries
 * reference only the kinds' function declarations, or wrap them, so they are safe to build
 * while such a cycle is still being loaded.
 */
import type { StageModelKind } from '../model.ts';
import { KIND_WORDS, type KindNames } from './kind-names.ts';
import type { DesignFields, OperatingPoint, StageEvaluation, StageFlag, StageSpec } from './types.ts';
import type { StageDesign } from './index.ts';
import type { KindWindow } from './window-cases.ts';
import type { LibraryRow, PartPick, PickOptions } from '../library.ts';
import { buckParts } from './buck/parts.ts';
import { coupledBuckParts } from './cwbuck/parts.ts';
import { ldoParts } from './ldo/parts.ts';
import { buckDesignFields, buckWindowOutputs, designBuck, dividerWindowCases, evaluateBuck, type BuckDesign } from './buck/index.ts';
import { buckNetlist } from './buck/netlist.ts';
import { coupledDesignFields, coupledMagneticCorners, coupledWindowCases, coupledWindowOutputs, designCoupledBuck, drawMagnetic, evaluateCoupledBuck, type CoupledBuckDesign, type CoupledEvalOptions } from './cwbuck/index.ts';
import { coupledBuckNetlist } from './cwbuck/netlist.ts';
import { designLdo, evaluateLdo, ldoDesignFields, ldoWindowCases, ldoWindowOutputs, type LdoDesign } from './ldo/index.ts';
import { boostDesignFields, boostNetlist, boostParts, boostWindowOutputs, designBoost, evaluateBoost, type BoostDesign } from './boost/index.ts';
import { designInverting, evaluateInverting, invertingDesignFields, invertingNetlist, invertingParts, invertingWindowOutputs, type InvertingDesign } from './inverting/index.ts';
import { designFourSwitch, evaluateFourSwitch, fourSwitchDesignFields, fourSwitchNetlist, fourSwitchParts, fourSwitchWindowOutputs, type FourSwitchDesign } from './buck-boost-4s/index.ts';
import { designLoadSwitch, evaluateLoadSwitch, loadSwitchDesignFields, loadSwitchParts, loadSwitchWindowCases, loadSwitchWindowOutputs, type LoadSwitchDesign } from './load-switch/index.ts';
import { designIsoModule, evaluateIsoModule, isoModuleDesignFields, isoModuleParts, isoModuleWindowCases, isoModuleWindowOutputs, type IsoModuleDesign } from './iso-module/index.ts';

export type KindDesignResult<D> =
  | { ok: true; design: D; reasons: string[]; flags: StageFlag[] }
  | { ok: false; flags: StageFlag[] };

/** What every stage kind provides from its folder. */
export interface StageKindModule<D extends { kind: StageModelKind }> {
  kind: D['kind'];
  /** What the kind is called in the tree drawing and the report (lower case, a trade term). */
  label: string;
  names: KindNames;
  /** The colour of its side bar and kind line in the tree drawing (the project's own palette). */
  colour: string;
  design(spec: StageSpec): KindDesignResult<D>;
  evaluate(design: D, op: OperatingPoint, opts?: CoupledEvalOptions): StageEvaluation;
  /**
   * Its evaluation depends on the operating mode (OperatingPoint.mode): a load switch is off in
   * the modes its rail is gated off. The roll-up passes the mode only to such a kind.
   */
  perMode: boolean;
  /** The fields every design of the kind carries (compiler-checked complete): a design read from a file must have them. */
  designFields(): DesignFields<D>;
  /** Its part of the worst-case window computation (windows.ts): outputs at a corner, tolerance cases. */
  window: KindWindow<D>;
  /** Its parts for the BOM, picked from the library by library.ts's rules (partsForStage dispatches here). */
  parts(stageId: string, design: D, library: LibraryRow[], opts: Partial<PickOptions>): PartPick[];
  /** The open-loop SPICE netlist at one operating point, for a kind that switches (absent: none). */
  netlist?(design: D, op: OperatingPoint): string;
}

function kindModule<D extends { kind: StageModelKind }>(m: StageKindModule<D>): StageKindModule<D> { return m; }

export const STAGE_KINDS = {
  'buck': kindModule<BuckDesign>({
    kind: 'buck', ...KIND_WORDS['buck'], design: designBuck, evaluate: (d, op) => evaluateBuck(d, op), netlist: (d, op) => buckNetlist(d, op),
    perMode: false,
    designFields: buckDesignFields,
    parts: (id, d, lib, o) => buckParts(id, d, lib, o),
    window: { outputsAt: buckWindowOutputs, cases: () => dividerWindowCases() },
  }),
  'cwbuck': kindModule<CoupledBuckDesign>({
    kind: 'cwbuck', ...KIND_WORDS['cwbuck'], design: designCoupledBuck, evaluate: (d, op, o) => evaluateCoupledBuck(d, op, o), netlist: (d, op) => coupledBuckNetlist(d, op),
    perMode: false,
    designFields: coupledDesignFields,
    parts: (id, d, lib, o) => coupledBuckParts(id, d, lib, o),
    window: { outputsAt: coupledWindowOutputs, cases: () => coupledWindowCases(), rectifierDrop: true, magnetic: { corners: coupledMagneticCorners, draw: drawMagnetic } },
  }),
  'ldo': kindModule<LdoDesign>({
    kind: 'ldo', ...KIND_WORDS['ldo'], design: designLdo, evaluate: (d, op) => evaluateLdo(d, op),
    perMode: false,
    designFields: ldoDesignFields,
    parts: (id, d, lib, o) => ldoParts(id, d, lib, o),
    window: { outputsAt: ldoWindowOutputs, cases: () => ldoWindowCases() },
  }),
  'boost': kindModule<BoostDesign>({
    kind: 'boost', ...KIND_WORDS['boost'], design: designBoost, evaluate: (d, op) => evaluateBoost(d, op), netlist: (d, op) => boostNetlist(d, op),
    perMode: false,
    designFields: boostDesignFields,
    parts: (id, d, lib, o) => boostParts(id, d, lib, o),
    window: { outputsAt: boostWindowOutputs, cases: () => dividerWindowCases() },
  }),
  'inverting': kindModule<InvertingDesign>({
    kind: 'inverting', ...KIND_WORDS['inverting'], design: designInverting, evaluate: (d, op) => evaluateInverting(d, op), netlist: (d, op) => invertingNetlist(d, op),
    perMode: false,
    designFields: invertingDesignFields,
    parts: (id, d, lib, o) => invertingParts(id, d, lib, o),
    window: { outputsAt: invertingWindowOutputs, cases: () => dividerWindowCases() },
  }),
  'buck-boost-4s': kindModule<FourSwitchDesign>({
    kind: 'buck-boost-4s', ...KIND_WORDS['buck-boost-4s'], design: designFourSwitch, evaluate: (d, op) => evaluateFourSwitch(d, op), netlist: (d, op) => fourSwitchNetlist(d, op),
    perMode: false,
    designFields: fourSwitchDesignFields,
    parts: (id, d, lib, o) => fourSwitchParts(id, d, lib, o),
    window: { outputsAt: fourSwitchWindowOutputs, cases: () => dividerWindowCases() },
  }),
  'load-switch': kindModule<LoadSwitchDesign>({
    kind: 'load-switch', ...KIND_WORDS['load-switch'], design: designLoadSwitch, evaluate: (d, op) => evaluateLoadSwitch(d, op),
    perMode: true,
    designFields: loadSwitchDesignFields,
    parts: (id, d, lib) => loadSwitchParts(id, d, lib),
    window: { outputsAt: loadSwitchWindowOutputs, cases: () => loadSwitchWindowCases() },
  }),
  'iso-module': kindModule<IsoModuleDesign>({
    kind: 'iso-module', ...KIND_WORDS['iso-module'], design: designIsoModule, evaluate: (d, op) => evaluateIsoModule(d, op),
    perMode: false,
    designFields: isoModuleDesignFields,
    parts: (id, d, lib, o) => isoModuleParts(id, d, lib, o),
    window: { outputsAt: isoModuleWindowOutputs, cases: () => isoModuleWindowCases() },
  }),
} satisfies { [K in StageModelKind]: StageKindModule<{ kind: K }> & { kind: K } };

/** The registered module of a kind, or undefined for a kind with no stage model. */
export function kindModuleOf(kind: unknown): StageKindModule<{ kind: StageModelKind }> | undefined {
  return typeof kind === 'string' && Object.prototype.hasOwnProperty.call(STAGE_KINDS, kind)
    ? (STAGE_KINDS as Record<string, StageKindModule<any>>)[kind] // eslint-disable-line @typescript-eslint/no-explicit-any
    : undefined;
}

/** A kind's names; a kind no module registers (a saved plan written by hand) by its own word. */
export function kindNames(kind: string): KindNames {
  const m = kindModuleOf(kind);
  return m ? m.names : { title: kind, noun: kind, feeding: kind, full: kind };
}

/**
 * How the remedy "allow the … stage kind" names a kind: its trade word, with the kind's own
 * key in parentheses when the two differ ("coupled-winding buck (cwbuck)"), so the user can
 * find it in the project's allowed-kinds setting.
 */
export function kindSettingName(kind: string): string {
  const noun = kindNames(kind).noun;
  return noun.toLowerCase() === kind.toLowerCase() ? noun : `${noun} (${kind})`;
}

export { KIND_NAMES, type KindNames } from './kind-names.ts';

/** The fields a value lacks to be a design of its kind (every field, for a kind no module registers). */
export function missingDesignFields(o: object): string[] {
  const m = kindModuleOf(Reflect.get(o, 'kind'));
  if (!m) return ['kind'];
  return Object.keys(m.designFields()).filter((k) => !Object.prototype.hasOwnProperty.call(o, k));
}

/** A value read from a file is a stage design when its kind is registered and it carries every field of that kind's design. */
export function isStageDesign(o: object): o is StageDesign {
  return missingDesignFields(o).length === 0;
}
