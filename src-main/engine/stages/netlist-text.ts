/**
 * Shared pieces of the SPICE netlist writers that live in the stage-kind folders: numbers in
 * SPICE's exponent form and user text made safe for a comment line. User text (node names)
 * appears only in `*` comment lines, reduced to letters, digits and `._+-` so that no line
 * break, control character or SPICE syntax can leave the comment.
 */

export function spiceNumber(x: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`netlist value ${x} is not finite`);
  return Number.parseFloat(x.toPrecision(6)).toExponential().replace('e+', 'e');
}

/** A name for a comment line: at most 40 characters of [A-Za-z0-9._+-], others become `_`. */
export function commentText(s: string): string {
  const t = String(s).replace(/[^A-Za-z0-9._+-]/g, '_').slice(0, 40);
  return t === '' ? '_' : t;
}

export const NETLIST_CAUTION = [
  '* CAUTION: a simulation of estimated values, not a verified design. Where the input comes',
  '* from mains or a winding crosses an isolation barrier, the applicable safety standard,',
  '* local codes and a qualified engineer decide; this file certifies nothing.',
];

/** `.options`, `.tran` (step ≤ 10 ns) and the averaging `.meas` lines over the last cycles. */
export function transientLines(fsw: number, outs: string[], opts: { stopTime?: number; measureCycles?: number; maxStep?: number } = {}): string[] {
  const f = spiceNumber;
  const T = 1 / fsw;
  const stop = opts.stopTime ?? 1.5e-3;
  const cycles = opts.measureCycles ?? 40;
  const maxStep = Math.min(opts.maxStep ?? 10e-9, 10e-9);
  const from = stop - cycles * T;
  if (!(from > 0)) throw new RangeError(`stopTime ${stop} s is shorter than ${cycles} switching periods`);
  return [
    '.options method=gear reltol=1e-4',
    `.tran ${f(maxStep)} ${f(stop)} ${f(from - T)} ${f(maxStep)} uic`,
    ...outs.map((node, i) => `.meas tran v_out${i} AVG ${node} FROM=${f(from)} TO=${f(stop)}`),
    ...outs.map((node, i) => `.meas tran vpp_out${i} PP ${node} FROM=${f(from)} TO=${f(stop)}`),
    `.meas tran i_in AVG i(VIN) FROM=${f(from)} TO=${f(stop)}`,
    '.end',
  ];
}
