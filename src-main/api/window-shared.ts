/**
 * The pure values the window shares with main, owned by the contract (contract.ts).
 *
 * The window (src-renderer) imports from src-main only contract.ts and this module
 * (test/boundaries.test.ts). Everything here is a pure function or plain data with no IO,
 * so the window prints quantities, tables and part parameters exactly as main does.
 * Add an export here rather than importing an engine or api module from the window.
 */
export { formatQuantity, formatTolerance } from '../engine/notation.ts';
export { CLASS_PARAMS, type PartClass } from '../engine/part-classes.ts';
export { TABLE_COLUMNS, TABLE_TITLES, currentColumnKey, type ColumnDef } from './tables.ts';
// What each stage kind is called: its registry entry (engine/stages/registry.ts), as plain data.
export { KIND_NAMES, type KindNames } from '../engine/stages/kind-names.ts';
