/**
 * An independent reference grid for the coupled-winding buck (invented test circuits).
 *
 * Why a second netlist writer. test/reference/spice-points.ts simulates netlists written by
 * src-main/export/spice.ts, which make the engine's own assumptions (rectifiers without
 * capacitance, secondary-to-secondary coupling k_i·k_j, leakage placed where the engine puts
 * it). This file writes its circuits from first principles instead, from a plain parameter
 * list, without importing the exporter or the engine's designer:
 *
 *  - the magnetic is given by its physical turns ratios n_i = Ns/Np, the primary inductance
 *    Lp, self inductances Ls_i = n_i²·Lp, and a full coupling matrix (a K statement for every
 *    winding pair). Secondary-to-secondary coupling is either the star value k_i·k_j or the
 *    much tighter coupling of secondaries wound together (bifilar);
 *  - a synchronous switch pair as voltage-controlled switches with the given Ron, each with a
 *    body diode, driven by PULSE sources at duty D with a dead time at both edges;
 *  - rectifier diode models with junction capacitance (CJO, grading M, VJ): Schottky parts
 *    at 30–100 pF, ultrafast silicon at 12–18 pF with a transit time TT (reverse recovery);
 *  - winding resistances, output capacitors with ESR, resistive loads, an optional RC
 *    snubber across a rectifier.
 *
 * The primary runs OPEN LOOP at the point's duty; the engine is then compared given the same
 * (simulated) primary voltage and the simulated load currents. The engine is told the
 * magnetic as M/Lp and k (its convention: every leakage on the secondary side, exact while
 * the switches clamp the primary), i.e. Ls and M directly, not the physical turns.
 *
 * What this check can catch: missing or wrong physics of the secondaries (rectifier
 * capacitance and the leakage ring, peak charging at light load, shared leakage of windings
 * wound together, recovery charge, discontinuous secondary current), the cross-regulation
 * between windings, the rectifiers' reverse-voltage peaks, and the conduction losses.
 * What it cannot catch: switching losses (the switches are ideal, no Coss, no gate
 * charge), core loss and saturation, the closed-loop controller (duty limits, pulse
 * skipping), temperature, part tolerances, layout parasitics beyond the listed ones, and any
 * error this writer shares with the engine by chance (both start from the same idealised
 * lumped circuit: the check is independent of the engine's equations, not of the circuit
 * idealisation).
 */
import type { SpiceResult } from '../helpers/ngspice.ts';

export type RectifierKind = 'schottky' | 'ultrafast';

/** A diode as an ngspice .model (SPICE level-1 diode). */
export interface SpiceDiode {
  kind: RectifierKind;
  is: number;
  n: number;
  rs: number;
  cjo: number;
  vj: number;
  m: number;
  tt: number;
}

/** Realistic-looking rectifier data (from memory, typical of small SMD parts). */
export const schottky = (cjo: number): SpiceDiode => ({ kind: 'schottky', is: 3e-6, n: 1.05, rs: 0.05, cjo, vj: 0.35, m: 0.5, tt: 0 });
export const ultrafast = (cjo: number, tt = 15e-9): SpiceDiode => ({ kind: 'ultrafast', is: 2e-9, n: 1.6, rs: 0.08, cjo, vj: 0.7, m: 0.45, tt });

export interface GridSecondary {
  /** Physical turns ratio Ns/Np, signed (negative: reversed winding, rectifier reversed, negative output). */
  n: number;
  /** Coupling factor to the primary. */
  k: number;
  /** Winding resistance (Ω). */
  r: number;
  diode: SpiceDiode;
  /** Output capacitor and its ESR. */
  c: number;
  esr: number;
  /** Load resistor (Ω) and the full-load current it is a share of. */
  rload: number;
  ifull: number;
  share: number;
  snubber?: { r: number; c: number };
}

export interface GridPoint {
  name: string;
  vin: number;
  /** High-side on-time share of the period. */
  duty: number;
  fsw: number;
  lp: number;
  /** Primary winding resistance. */
  rp: number;
  rhs: number;
  rls: number;
  deadTime: number;
  /** Body diodes (silicon). */
  body: { is: number; n: number; rs: number };
  pri: { c: number; esr: number; rload: number };
  sec: GridSecondary[];
  /** Secondary-to-secondary couplings that differ from the star value k_i·k_j (0-based secondaries). */
  kss?: { a: number; b: number; k: number }[];
  /** Label of the winding arrangement. */
  arrangement: 'star' | 'wound-together';
}

/** Coupling between windings a and b (0 = primary, i + 1 = secondary i). */
export function couplingOf(p: GridPoint, a: number, b: number): number {
  if (a === b) return 1;
  const [i, j] = a < b ? [a, b] : [b, a];
  if (i === 0) return p.sec[j - 1]!.k;
  const given = p.kss?.find((x) => (x.a === i - 1 && x.b === j - 1) || (x.a === j - 1 && x.b === i - 1));
  return given ? given.k : p.sec[i - 1]!.k * p.sec[j - 1]!.k;
}

/** The coupling matrix must be positive definite (a passive magnetic): Cholesky test. */
export function couplingPositiveDefinite(p: GridPoint): boolean {
  const m = p.sec.length + 1;
  const L: number[][] = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (let i = 0; i < m; i++) {
    for (let j = 0; j <= i; j++) {
      let s = couplingOf(p, i, j);
      for (let q = 0; q < j; q++) s -= L[i]![q]! * L[j]![q]!;
      if (i === j) {
        if (!(s > 0)) return false;
        L[i]![i] = Math.sqrt(s);
      } else L[i]![j] = s / L[j]![j]!;
    }
  }
  return true;
}

const g = (x: number) => x.toPrecision(6);

/** Averaging windows: three consecutive windows of W periods at the end of the run. */
export const WINDOW_PERIODS = 40;

export function periodsFor(p: GridPoint): number {
  // Long enough for the slowest output (light load on a small capacitor) to settle; the
  // three-window extrapolation in readGrid covers what is left.
  return Math.round(Math.min(1600, Math.max(600, 1.2e-3 * p.fsw)));
}

/** Crude independent starting estimates (ideal converter) for the initial conditions. */
function estimates(p: GridPoint) {
  const vpri = p.duty * p.vin;
  const vsec = p.sec.map((s) => Math.abs(s.n) * s.k * vpri);
  return { vpri, vsec };
}

export function independentNetlist(p: GridPoint): string {
  if (!couplingPositiveDefinite(p)) throw new Error(`${p.name}: coupling matrix is not positive definite`);
  const T = 1 / p.fsw;
  const td = p.deadTime;
  const ton = p.duty * T;
  const periods = periodsFor(p);
  const tstop = periods * T;
  const est = estimates(p);
  const L: string[] = [];
  L.push(`* independent coupled-winding buck grid point ${p.name} (invented test circuit)`);
  L.push('* open loop at the given duty; written from first principles, not by the project exporter');
  L.push(`Vin vin 0 DC ${g(p.vin)}`);
  // Gate drives: high side on for D·T, low side on between the two dead times.
  L.push(`Vgh gh 0 PULSE(0 5 0 1n 1n ${g(ton - 1e-9)} ${g(T)})`);
  L.push(`Vgl gl 0 PULSE(0 5 ${g(ton + td)} 1n 1n ${g(T - ton - 2 * td - 1e-9)} ${g(T)})`);
  L.push(`S1 vin sw gh 0 SWH`);
  L.push(`S2 sw 0 gl 0 SWL`);
  L.push(`.model SWH SW(VT=2.5 VH=0.1 RON=${g(p.rhs)} ROFF=1e7)`);
  L.push(`.model SWL SW(VT=2.5 VH=0.1 RON=${g(p.rls)} ROFF=1e7)`);
  L.push(`Dbh sw vin DBODY`);
  L.push(`Dbl 0 sw DBODY`);
  L.push(`.model DBODY D(IS=${g(p.body.is)} N=${g(p.body.n)} RS=${g(p.body.rs)})`);
  // Primary winding: Lp between the switch node and its resistance to the primary output.
  const ipri0 = est.vpri / p.pri.rload + p.sec.reduce((a, s, i) => a + Math.abs(s.n) * (est.vsec[i]! / s.rload), 0);
  L.push(`L0 sw x0 ${g(p.lp)} IC=${g(ipri0)}`);
  L.push(`R0 x0 o0 ${g(p.rp)}`);
  L.push(`C0 o0 c0 ${g(p.pri.c)} IC=${g(est.vpri)}`);
  L.push(`RC0 c0 0 ${g(p.pri.esr)}`);
  // Damper on the primary output (RC, R = √(Lp/C), 4·C; common practice) so the open-loop
  // LC filter settles in the simulated time; it carries no DC.
  L.push(`Cd0 o0 d0 ${g(4 * p.pri.c)} IC=${g(est.vpri)}`);
  L.push(`Rd0 d0 0 ${g(Math.sqrt(p.lp / p.pri.c))}`);
  L.push(`RL0 o0 0 ${g(p.pri.rload)}`);
  const models = new Map<string, SpiceDiode>();
  p.sec.forEach((s, i) => {
    const w = i + 1;
    const ls = s.n * s.n * p.lp;
    // The primary's dot is at the switch node, so during the off-time (switch node low) the
    // undotted end of each winding is positive: a positive output takes its rectifier from
    // the undotted end (dot at ground), and conducts in the off-time. A reversed winding
    // swaps its ends, its rectifier points the other way and its output is negative.
    const key = `DR${w}`;
    models.set(key, s.diode);
    if (s.n > 0) {
      L.push(`L${w} 0 a${w} ${g(ls)}`);
      L.push(`R${w} a${w} b${w} ${g(s.r)}`);
      L.push(`D${w} b${w} o${w} ${key}`);
      if (s.snubber) L.push(`Rs${w} b${w} sn${w} ${g(s.snubber.r)}`, `Cs${w} sn${w} o${w} ${g(s.snubber.c)}`);
    } else {
      L.push(`L${w} a${w} 0 ${g(ls)}`);
      L.push(`R${w} a${w} b${w} ${g(s.r)}`);
      L.push(`D${w} o${w} b${w} ${key}`);
      if (s.snubber) L.push(`Rs${w} b${w} sn${w} ${g(s.snubber.r)}`, `Cs${w} sn${w} o${w} ${g(s.snubber.c)}`);
    }
    const v0 = Math.sign(s.n) * est.vsec[i]!;
    L.push(`C${w} o${w} c${w} ${g(s.c)} IC=${g(v0)}`);
    L.push(`RC${w} c${w} 0 ${g(s.esr)}`);
    L.push(`RL${w} o${w} 0 ${g(s.rload)}`);
  });
  // Every winding pair coupled. The primary's dot is at the switch node.
  const m = p.sec.length + 1;
  for (let a = 0; a < m; a++) {
    for (let b = a + 1; b < m; b++) L.push(`K${a}_${b} L${a} L${b} ${g(couplingOf(p, a, b))}`);
  }
  for (const [key, d] of models) {
    L.push(`.model ${key} D(IS=${g(d.is)} N=${g(d.n)} RS=${g(d.rs)} CJO=${g(d.cjo)} VJ=${g(d.vj)} M=${g(d.m)} TT=${g(d.tt)})`);
  }
  L.push('.options method=gear reltol=1e-4 itl4=100');
  L.push(`.tran 10n ${g(tstop)} 0 10n uic`);
  const W = WINDOW_PERIODS * T;
  const win = [tstop - 3 * W, tstop - 2 * W, tstop - W, tstop];
  for (let o = 0; o < m; o++) {
    for (let q = 0; q < 3; q++) L.push(`.meas tran v${o}_w${q} AVG v(o${o}) FROM=${g(win[q]!)} TO=${g(win[q + 1]!)}`);
  }
  for (let q = 0; q < 3; q++) L.push(`.meas tran iin_w${q} AVG i(Vin) FROM=${g(win[q]!)} TO=${g(win[q + 1]!)}`);
  p.sec.forEach((s, i) => {
    const w = i + 1;
    // Reverse voltage across the rectifier (cathode minus anode), largest over the last window.
    const vr = s.n > 0 ? `v(o${w})-v(b${w})` : `v(b${w})-v(o${w})`;
    L.push(`.meas tran vr${w}_max MAX par('${vr}') FROM=${g(win[2]!)} TO=${g(win[3]!)}`);
  });
  L.push('.end');
  return L.join('\n') + '\n';
}

export interface GridSimulated {
  name: string;
  /** Settled output voltages (signed), primary first. */
  v: number[];
  /** Last-window averages before extrapolation, and the extrapolation's correction (relative). */
  vLast: number[];
  settle: number[];
  /** Average input current (A, positive into the converter). */
  iin: number;
  /** Largest rectifier reverse voltage over the last window. */
  vrMax: number[];
}

/**
 * Settled value from three consecutive window averages: Aitken's extrapolation when the
 * sequence converges geometrically (a first-order approach), the last average otherwise.
 */
export function settled(a: number, b: number, c: number): number {
  const d1 = b - a;
  const d2 = c - b;
  const r = d2 / d1;
  if (!(Math.abs(d1) > 1e-12) || !(r > 0 && r < 0.9)) return c;
  return c + (d2 * r) / (1 - r);
}

export function readGrid(p: GridPoint, sim: SpiceResult): GridSimulated {
  const m = p.sec.length + 1;
  const v: number[] = [];
  const vLast: number[] = [];
  const settle: number[] = [];
  for (let o = 0; o < m; o++) {
    const w = [0, 1, 2].map((q) => sim.meas[`v${o}_w${q}`]);
    if (w.some((x) => x === undefined)) throw new Error(`${p.name}: ngspice gave no average for output ${o}`);
    const s = settled(w[0]!, w[1]!, w[2]!);
    v.push(s);
    vLast.push(w[2]!);
    settle.push((s - w[2]!) / Math.abs(s));
  }
  const iin = -(sim.meas.iin_w2 ?? Number.NaN);
  const vrMax = p.sec.map((_, i) => sim.meas[`vr${i + 1}_max`] ?? Number.NaN);
  return { name: p.name, v, vLast, settle, iin, vrMax };
}

// ---------------------------------------------------------------------------------------
// The grid: 44 invented points. Turns ratios 0.5–8 both polarities, duty 0.08–0.6, coupling
// 0.97–0.999 (secondaries wound together included), 1–3 secondaries, loads 1–100 % of full
// load, Schottky and ultrafast rectifiers, a few snubbers.

interface SecIn {
  n: number;
  k: number;
  ifull: number;
  share: number;
  diode: SpiceDiode;
  snubber?: { r: number; c: number };
}

const BODY = { is: 5e-14, n: 1.0, rs: 0.02 };

function point(name: string, vin: number, duty: number, fsw: number, ipri: number, secs: SecIn[], kss?: { a: number; b: number; k: number }[]): GridPoint {
  const vpri = vin * duty;
  const T = 1 / fsw;
  const im = ipri + secs.reduce((a, s) => a + Math.abs(s.n) * s.ifull * s.share, 0);
  const imFull = ipri + secs.reduce((a, s) => a + Math.abs(s.n) * s.ifull, 0);
  // Lp for ≈ 40 % magnetizing ripple at full load (common practice 20–40 %).
  const lp = Number(((vin - vpri) * duty * T / (0.4 * Math.max(imFull, 0.1))).toPrecision(2));
  const rp = Number((0.012 * Math.sqrt(lp / 1e-6)).toPrecision(2));
  void im;
  const sec: GridSecondary[] = secs.map((s) => {
    const vs = Math.abs(s.n) * s.k * vpri;
    const i = s.ifull * s.share;
    // Output capacitor: ripple ≈ I·T/C ≤ 0.2 % of V, at least 0.1 µF, at most 22 µF; small
    // capacitors at light load keep the simulated settling short without changing the DC.
    const c = Number(Math.min(22e-6, Math.max(0.1e-6, (i * T) / (0.002 * Math.max(vs, 0.5)))).toPrecision(2));
    return {
      n: s.n, k: s.k, r: Number((rp * s.n * s.n).toPrecision(2)), diode: s.diode,
      c, esr: 0.01, rload: Number((Math.max(vs - 0.4, 0.3) / i).toPrecision(3)), ifull: s.ifull, share: s.share,
      ...(s.snubber ? { snubber: s.snubber } : {}),
    };
  });
  return {
    name, vin, duty, fsw, lp, rp, rhs: 0.06, rls: 0.035, deadTime: 20e-9, body: BODY,
    pri: { c: 22e-6, esr: 0.005, rload: Number((vpri / ipri).toPrecision(3)) },
    sec, ...(kss ? { kss } : {}), arrangement: kss ? 'wound-together' : 'star',
  };
}

const S = (n: number, k: number, ifull: number, share: number, diode: SpiceDiode = schottky(60e-12), snubber?: { r: number; c: number }): SecIn =>
  ({ n, k, ifull, share, diode, ...(snubber ? { snubber } : {}) });

const sk30 = schottky(30e-12), sk60 = schottky(60e-12), sk100 = schottky(100e-12);
const uf12 = ultrafast(12e-12), uf18 = ultrafast(18e-12);
/** Bifilar pair: secondaries wound together couple far tighter than k_i·k_j. */
const together = (k: number) => [{ a: 0, b: 1, k }];

export const GRID: GridPoint[] = [
  // One secondary, turns ratio and duty sweep at full load.
  point('g01', 12, 0.42, 400e3, 0.4, [S(2.4, 0.99, 0.1, 1)]),
  point('g02', 12, 0.42, 400e3, 0.4, [S(0.5, 0.99, 0.3, 1)]),
  point('g03', 24, 0.15, 500e3, 0.5, [S(4, 0.98, 0.1, 1)]),
  point('g04', 48, 0.08, 300e3, 0.5, [S(4, 0.997, 0.08, 1)]),
  point('g05', 48, 0.08, 300e3, 0.5, [S(8, 0.99, 0.04, 1, uf18)]),
  point('g06', 48, 0.1, 300e3, 0.4, [S(-3, 0.99, 0.08, 1)]),
  point('g07', 12, 0.6, 400e3, 0.3, [S(1.5, 0.99, 0.15, 1)]),
  point('g08', 12, 0.6, 400e3, 0.3, [S(-1, 0.97, 0.15, 1)]),
  point('g09', 20, 0.25, 400e3, 0.6, [S(-2, 0.985, 0.1, 1)]),
  point('g10', 36, 0.33, 350e3, 0.3, [S(2, 0.999, 0.1, 1)]),
  // Load sweep on one high-ratio secondary (the planner's standby region).
  point('g11', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.5)]),
  point('g12', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.1)]),
  point('g13', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.02, sk60)]),
  point('g14', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.01, sk100)]),
  point('g15', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.02, sk30)]),
  point('g16', 48, 0.1, 300e3, 0.4, [S(3, 0.99, 0.1, 0.02, uf12)]),
  point('g17', 24, 0.2, 400e3, 0.5, [S(3, 0.98, 0.1, 0.05)]),
  point('g18', 24, 0.2, 400e3, 0.5, [S(3, 0.98, 0.1, 0.02, sk60, { r: 470, c: 220e-12 })]),
  point('g19', 12, 0.45, 400e3, 0.4, [S(-2, 0.99, 0.1, 0.02)]),
  point('g20', 12, 0.45, 400e3, 0.4, [S(-2, 0.99, 0.1, 0.1)]),
  // Two secondaries, star and wound together.
  point('g21', 24, 0.14, 500e3, 0.5, [S(1.5, 0.98, 0.2, 1), S(-1.5, 0.98, 0.1, 1)]),
  point('g22', 24, 0.14, 500e3, 0.5, [S(1.5, 0.98, 0.2, 1), S(-1.5, 0.98, 0.1, 1)], together(0.998)),
  point('g23', 24, 0.14, 500e3, 0.5, [S(1.5, 0.98, 0.2, 1), S(-1.5, 0.98, 0.1, 0.05)], together(0.998)),
  point('g24', 12, 0.5, 400e3, 0.3, [S(2, 0.99, 0.1, 1), S(-2, 0.99, 0.1, 1)], together(0.999)),
  point('g25', 12, 0.6, 400e3, 0.3, [S(2, 0.99, 0.1, 1), S(-2, 0.99, 0.1, 1)], together(0.999)),
  point('g26', 48, 0.1, 300e3, 0.3, [S(3, 0.997, 0.08, 1), S(-3, 0.997, 0.08, 1)]),
  point('g27', 48, 0.1, 300e3, 0.3, [S(3, 0.997, 0.08, 0.02), S(-3, 0.997, 0.08, 1)]),
  point('g28', 48, 0.1, 300e3, 0.3, [S(3, 0.997, 0.08, 1), S(-3, 0.997, 0.08, 0.02)], together(0.9995)),
  point('g29', 36, 0.33, 350e3, 0.3, [S(2, 0.985, 0.1, 1), S(0.5, 0.985, 0.3, 0.3, uf12)]),
  point('g30', 20, 0.25, 400e3, 0.8, [S(2.4, 0.99, 0.15, 0.1), S(-1.6, 0.99, 0.1, 0.5)]),
  point('g31', 12, 0.42, 400e3, 0.4, [S(1, 0.97, 0.2, 1, uf18), S(2.4, 0.97, 0.05, 0.1)]),
  point('g32', 24, 0.2, 500e3, 0.5, [S(-4, 0.99, 0.05, 1), S(-4, 0.99, 0.05, 0.01)], together(0.999)),
  // Three secondaries.
  point('g33', 48, 0.104, 300e3, 0.3, [S(3, 0.997, 0.08, 1), S(-3, 0.997, 0.08, 1), S(1, 0.997, 0.15, 1)]),
  point('g34', 48, 0.104, 300e3, 0.3, [S(3, 0.997, 0.08, 0.02), S(-3, 0.997, 0.08, 0.02), S(1, 0.997, 0.15, 1)]),
  point('g35', 48, 0.104, 300e3, 0.3, [S(3, 0.99, 0.08, 1), S(-3, 0.99, 0.08, 1), S(1, 0.99, 0.15, 0.1)], [{ a: 0, b: 1, k: 0.999 }, { a: 0, b: 2, k: 0.985 }, { a: 1, b: 2, k: 0.985 }]),
  point('g36', 20, 0.25, 400e3, 0.8, [S(2.4, 0.99, 0.15, 1), S(0.66, 0.99, 0.2, 1), S(-1.6, 0.99, 0.1, 1)]),
  point('g37', 20, 0.25, 400e3, 0.8, [S(2.4, 0.99, 0.15, 0.01), S(0.66, 0.99, 0.2, 0.05), S(-1.6, 0.99, 0.1, 0.02)]),
  point('g38', 18, 0.18, 500e3, 0.5, [S(1.5, 0.98, 0.2, 1), S(-1.5, 0.98, 0.1, 1), S(3, 0.98, 0.05, 1, uf12)]),
  point('g39', 12, 0.55, 400e3, 0.3, [S(2, 0.99, 0.1, 1), S(-2, 0.99, 0.1, 0.3), S(1, 0.99, 0.1, 0.5)], [{ a: 0, b: 1, k: 0.999 }, { a: 0, b: 2, k: 0.99 }, { a: 1, b: 2, k: 0.99 }]),
  point('g40', 48, 0.08, 300e3, 0.5, [S(8, 0.99, 0.03, 0.1, uf18), S(4, 0.99, 0.05, 1), S(-4, 0.99, 0.05, 1)]),
  point('g41', 36, 0.15, 350e3, 0.4, [S(3, 0.985, 0.1, 1, sk100, { r: 220, c: 470e-12 }), S(-3, 0.985, 0.1, 0.02, sk100)]),
  point('g42', 24, 0.3, 400e3, 0.4, [S(1, 0.97, 0.3, 1), S(2, 0.97, 0.1, 0.02), S(-1, 0.97, 0.3, 1)]),
  point('g43', 48, 0.2, 300e3, 0.3, [S(2, 0.99, 0.1, 1, uf12), S(-2, 0.99, 0.1, 1, uf12)], together(0.999)),
  point('g44', 12, 0.3, 400e3, 0.5, [S(5, 0.99, 0.04, 0.05), S(-5, 0.99, 0.04, 0.05)], together(0.999)),
];
