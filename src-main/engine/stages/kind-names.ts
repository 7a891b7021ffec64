/**
 * What each stage kind is called and its drawing colour, as plain data with no code behind it:
 * the registry (registry.ts) spreads each kind's line into its module, and the window reads
 * KIND_NAMES through api/window-shared.ts without pulling the stage engine into its bundle.
 * A new kind adds one line here beside its registry line (DEVELOPERS.md, "How to add a stage model").
 */
import type { StageModelKind } from '../model.ts';

/** What a stage kind is called: one entry per kind, read by the planner, the window and the drawing. */
export interface KindNames {
  /** Title case, as a plan names its stages ("Boost Main 5V"). */
  title: string;
  /** The plain trade word in running text ("feeds: buck, LDO, boost"). */
  noun: string;
  /** How a reason names a stage of this kind feeding a rail ("an LDO from Main 5V"). */
  feeding: string;
  /** The name in full, as the window's inspector shows it ("linear regulator (LDO)"). */
  full: string;
}

/** A kind's words: its drawing label (lower case, a trade term), its names, its drawing colour. */
export interface KindWords {
  label: string;
  names: KindNames;
  /** The colour of its side bar and kind line in the tree drawing (the project's own palette). */
  colour: string;
}

export const KIND_WORDS = {
  'buck': { label: 'synchronous buck', names: { title: 'Buck', noun: 'buck', feeding: 'its own buck', full: 'synchronous buck' }, colour: '#2f7f8f' },
  'cwbuck': { label: 'coupled-winding buck', names: { title: 'Coupled-winding buck', noun: 'coupled-winding buck', feeding: 'a coupled-winding buck', full: 'coupled-winding buck' }, colour: '#c27a17' },
  'ldo': { label: 'LDO', names: { title: 'LDO', noun: 'LDO', feeding: 'an LDO', full: 'linear regulator (LDO)' }, colour: '#6a55a8' },
  'boost': { label: 'synchronous boost', names: { title: 'Boost', noun: 'boost', feeding: 'a boost', full: 'synchronous boost' }, colour: '#3f7f3a' },
  'inverting': { label: 'inverting buck-boost', names: { title: 'Inverting buck-boost', noun: 'inverting buck-boost', feeding: 'an inverting buck-boost', full: 'inverting buck-boost' }, colour: '#8f3f6a' },
  'buck-boost-4s': { label: 'four-switch buck-boost', names: { title: 'Four-switch buck-boost', noun: 'four-switch buck-boost', feeding: 'a four-switch buck-boost', full: 'four-switch buck-boost' }, colour: '#2f5f9f' },
  'load-switch': { label: 'load switch', names: { title: 'Load switch', noun: 'load switch', feeding: 'a load switch', full: 'load switch' }, colour: '#55606b' },
  'iso-module': { label: 'isolated module', names: { title: 'Isolated module', noun: 'isolated module', feeding: 'an isolated module', full: 'isolated module' }, colour: '#8a5a44' },
} as const satisfies { [K in StageModelKind]: KindWords };

/** Every kind's names, as plain data (the window reads them through api/window-shared.ts). */
export const KIND_NAMES: Readonly<Record<StageModelKind, KindNames>> = Object.fromEntries(
  Object.entries(KIND_WORDS).map(([k, w]) => [k, { ...w.names }]),
) as Record<StageModelKind, KindNames>;
