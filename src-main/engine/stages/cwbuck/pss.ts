/**
 * Periodic steady state of the coupled-winding buck's switching cycle, found numerically, for
 * the secondaries the closed form in index.ts does not follow: light load, where the leakage
 * rings with the rectifier's junction capacitance and peak-charges the output, discontinuous
 * secondary current, and RC-snubbed rectifiers.
 *
 * The circuit over one period (the same lumped circuit the closed form idealises):
 *  - the switch node is a known source per sub-interval: high side on (Vin − Rhs·ip), dead
 *    time (a body diode: −Vf(ip) for a positive primary current, Vin + Vf(−ip) for a negative
 *    one; with the current at zero the node floats and the primary winding carries nothing),
 *    low side on (−Rls·ip), dead time again;
 *  - the magnetic is the full inductance matrix (primary first; self inductances Lp and
 *    Ls = n²·Lp/k², mutuals k_ab·√(La·Lb)), every winding with its resistance;
 *  - the primary output is held at its (regulated or given) voltage; each secondary output is
 *    a DC voltage (its capacitor is slow against the period) drawing its load and preload;
 *  - each rectifier is a switch: on, the Shockley drop n·Vt·ln(1 + i/Is) + Rs·i (with a
 *    transit time TT, the charge-control model: stored charge q, dq/dt = i − q/TT, the drop at
 *    the junction current q/TT, so the part conducts backwards until q is swept out); off, its
 *    junction capacitance C(v) = CJO·(1 − v/VJ)^−M (SPICE level-1 diode, linear above FC·VJ
 *    with FC = 0.5) with any RC snubber across it.
 *
 * Solution. Within a sub-interval the equations are integrated by the Dormand–Prince 5(4)
 * pair with step-size control (Hairer, Nørsett & Wanner, Solving ODEs I, §II.5), rectifier
 * and body-diode transitions located inside the step. Periods are repeated from the state the
 * last one left; each period the magnetizing current's DC is set so the primary winding
 * averages the primary load (charge balance on the primary capacitor), and the duty is
 * trimmed so the magnetizing current returns to its start (volt-second balance); the fast
 * states are extrapolated (Aitken, per component) once they converge geometrically. Around
 * that, the output voltages are found by a secant per output on the charge balance: the
 * winding's average current equals the load plus preload.
 */
import { VT, type DiodeModel } from '../defaults.ts';

export interface PssWinding {
  /** Winding resistance (Ω). */
  r: number;
  rect: DiodeModel;
  /** Scale on the rectifier drop (the windows' spread). */
  vfScale: number;
  snubber?: { r: number; c: number };
  /** Load current drawn at any voltage (A), and the preload conductance (S, 0 without one). */
  iload: number;
  gpre: number;
  /** Starting estimate of the output's magnitude (V). */
  vguess: number;
}

export interface PssCircuit {
  vin: number;
  vpri: number;
  /** Primary load current (A): the primary winding's average. */
  ipri: number;
  fsw: number;
  /** High-side on share of the period (a starting value; trimmed for volt-second balance). */
  duty: number;
  deadTime: number;
  rhs: number;
  rls: number;
  rp: number;
  body: DiodeModel;
  /**
   * Inductance matrix, primary first, in the sense where every secondary conducts with a
   * positive current when the primary winding's voltage is negative (reversed windings are
   * written with their own sense, so all mutuals are positive).
   */
  L: number[][];
  windings: PssWinding[];
}

export interface PssSecondary {
  /** Output magnitude (V). */
  vout: number;
  /** Load plus preload current at that voltage. */
  isec: number;
  /** The winding's average current (equal to isec once converged). */
  iavg: number;
  irms: number;
  /** Largest winding current. */
  ipk: number;
  /** Rectifier conduction loss. */
  pRect: number;
  /** Time the rectifier conducts per period (s). */
  conduction: number;
  /** Largest reverse voltage across the rectifier. */
  vrMax: number;
  /** Loss in the snubber resistor. */
  pSnubber: number;
  /**
   * Share of the period's charge passed by conduction that restarts after the rectifier has
   * stopped within a sub-interval: the leakage ring touching forward (peak charging).
   */
  ringShare: number;
}

export interface PssResult {
  converged: boolean;
  /** Switching periods integrated. */
  periods: number;
  duty: number;
  /** Largest charge-balance error left, relative to the load (or 1 mA). */
  residual: number;
  /** Energy per period from the input, and what the model accounts for it (J): a check. */
  energyIn: number;
  energyOut: number;
  sec: PssSecondary[];
}

/** Linear-region boundary of the junction capacitance (SPICE FC default). */
const FC = 0.5;

function invert(a: number[][]): Float64Array {
  const n = a.length;
  const m = a.map((r) => [...r]);
  const inv = a.map((_, i) => a.map((__, j) => (i === j ? 1 : 0)));
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r]![c]!) > Math.abs(m[p]![c]!)) p = r;
    [m[c], m[p]] = [m[p]!, m[c]!];
    [inv[c], inv[p]] = [inv[p]!, inv[c]!];
    const d = m[c]![c]!;
    if (!(Math.abs(d) > 0)) throw new Error('inductance matrix is singular');
    for (let j = 0; j < n; j++) { m[c]![j]! /= d; inv[c]![j]! /= d; }
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = m[r]![c]!;
      if (f === 0) continue;
      for (let j = 0; j < n; j++) { m[r]![j]! -= f * m[c]![j]!; inv[r]![j]! -= f * inv[c]![j]!; }
    }
  }
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = inv[i]![j]!;
  return out;
}

// Dormand–Prince 5(4) coefficients (Hairer, Nørsett & Wanner, Table II.5.2).
const A2 = [1 / 5];
const A3 = [3 / 40, 9 / 40];
const A4 = [44 / 45, -56 / 15, 32 / 9];
const A5 = [19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729];
const A6 = [9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656];
const B = [35 / 384, 0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84];
const E = [71 / 57600, 0, -71 / 16695, 71 / 1920, -17253 / 339200, 22 / 525, -1 / 40];

type Seg = 0 | 1 | 2;

/** The solve ran out of integration steps (a stiff or chattering orbit): reported as not converged. */
class PssBudget extends Error {} // 0 high side on, 1 dead time, 2 low side on

/**
 * One solver instance per circuit: the matrices and work arrays are made once and reused by
 * every period and every outer pass.
 */
class Cycle {
  readonly m: number;
  readonly S: number;
  /** States: winding currents (m), per rectifier u (capacitor voltage off, stored charge on), snubber voltages (S). */
  readonly nx: number;
  /** Quadratures after the states: ∫i_j, ∫i_j², ∫rectifier loss per rectifier, ∫ip, ∫vsw·ip, ∫snubber loss, ∫ip². */
  readonly nq: number;
  readonly linv: Float64Array;
  /** Inverse of the secondaries' block (primary open, its current held at zero). */
  readonly lsinv: Float64Array;
  readonly Lrow0: Float64Array;
  on: Uint8Array;
  float = false;
  /** Dead time: +1 the low-side body diode clamps (positive primary current), −1 the high side's. */
  pSign = 1;
  seg: Seg = 0;
  private gs: Float64Array;
  vo: Float64Array;
  private v: Float64Array;
  private di: Float64Array;
  private k: Float64Array[];
  private y: Float64Array;
  private ytmp: Float64Array;
  readonly c: PssCircuit;
  readonly iscale: number;
  readonly vscale: number;
  hlast: number;
  /** Local error tolerance of the integration (relative to each state's scale). */
  tol = 3e-6;
  /** Steps left for the whole solve. */
  budget = 1e6;
  vrMin: Float64Array;
  ipk: Float64Array;
  onTime: Float64Array;

  constructor(c: PssCircuit) {
    this.c = c;
    this.m = c.L.length;
    this.S = c.windings.length;
    this.nx = this.m + 2 * this.S;
    this.nq = 3 * this.S + 4;
    const n = this.nx + this.nq;
    this.linv = invert(c.L);
    const sub = c.L.slice(1).map((r) => r.slice(1));
    this.lsinv = this.S > 0 ? invert(sub) : new Float64Array(0);
    this.Lrow0 = Float64Array.from(c.L[0]!);
    this.on = new Uint8Array(this.S);
    this.vo = new Float64Array(this.S);
    this.v = new Float64Array(this.m);
    this.di = new Float64Array(this.m);
    this.k = Array.from({ length: 7 }, () => new Float64Array(n));
    this.y = new Float64Array(n);
    this.ytmp = new Float64Array(n);
    const lp = c.L[0]![0]!;
    this.iscale = Math.max(c.ipri + c.windings.reduce((a, w, j) => a + Math.sqrt(c.L[j + 1]![j + 1]! / lp) * w.iload, 0), 1e-3);
    this.vscale = Math.max(c.vin, 1);
    this.hlast = 1 / c.fsw / 200;
    this.vrMin = new Float64Array(this.S);
    this.ipk = new Float64Array(this.S);
    this.onTime = new Float64Array(this.S);
    this.gs = new Float64Array(this.S + 1);
    this.ringOff = new Uint8Array(this.S);
    this.ringQ = new Float64Array(this.S);
  }

  /** Junction capacitance at forward voltage v (negative in reverse). */
  cj(j: number, v: number): number {
    const r = this.c.windings[j]!.rect;
    const c0 = r.cjo ?? 0;
    const vj = r.vj ?? 0.5;
    const m = r.m ?? 0.5;
    if (v < FC * vj) return c0 * Math.pow(1 - v / vj, -m);
    // Linear above FC·VJ (SPICE level-1 diode).
    return (c0 / Math.pow(1 - FC, 1 + m)) * (1 - FC * (1 + m) + (m * v) / vj);
  }

  /** Rectifier drop while on, at winding current iw: sets dVd, dId (terminal), dIsn (snubber). */
  private dVd = 0;
  private dId = 0;
  private dIsn = 0;
  private onDrop(j: number, x: Float64Array, iw: number): void {
    const w = this.c.windings[j]!;
    const r = w.rect;
    const tt = r.tt ?? 0;
    const sn = w.snubber;
    const vcs = sn ? x[this.m + this.S + j]! : 0;
    let isn = 0;
    let vd = 0;
    let id = iw;
    const passes = sn ? 3 : 1;
    for (let p = 0; p < passes; p++) {
      id = iw - isn;
      const ij = tt > 0 ? Math.max(0, x[this.m + j]! / tt) : Math.max(0, id);
      vd = w.vfScale * (r.n * VT * Math.log1p(ij / r.is) + r.rs * id);
      if (sn) isn = (vd - vcs) / sn.r;
    }
    this.dVd = vd; this.dId = id; this.dIsn = isn;
  }

  /** Switch-node voltage with the primary current ip in the present sub-interval (not floating). */
  private vsw(ip: number): number {
    const c = this.c;
    if (this.seg === 0) return c.vin - c.rhs * ip;
    if (this.seg === 2) return -c.rls * ip;
    const b = c.body;
    const a = Math.abs(ip);
    const vf = b.n * VT * Math.log1p(a / b.is) + b.rs * a;
    return this.pSign > 0 ? -vf : c.vin + vf;
  }

  /** Derivatives of states and quadratures. */
  f(x: Float64Array, out: Float64Array): void {
    const { m, S, c } = this;
    const v = this.v;
    const ip = x[0]!;
    for (let j = 0; j < S; j++) {
      const w = c.windings[j]!;
      const iw = x[1 + j]!;
      const qw = m + 2 * S;
      const vcs = x[m + S + j]!;
      if (this.on[j]) {
        this.onDrop(j, x, iw);
        const vd = this.dVd, id = this.dId, isn = this.dIsn;
        v[1 + j] = -(w.r * iw + vd + this.vo[j]!);
        const tt = w.rect.tt ?? 0;
        out[m + j] = tt > 0 ? id - Math.max(0, x[m + j]!) / tt : 0;
        out[m + S + j] = w.snubber ? isn / w.snubber.c : 0;
        out[qw + S + j] = iw * iw;
        out[qw + 2 * S + j] = vd * id;
        if (w.snubber) out[qw + 3 * S + 2] = out[qw + 3 * S + 2]! + isn * isn * w.snubber.r;
      } else {
        const vd = x[m + j]!;
        const isn = w.snubber ? (vd - vcs) / w.snubber.r : 0;
        // The diode's series resistance is in the loop with the capacitance while it is off.
        v[1 + j] = -((w.r + w.rect.rs) * iw + vd + this.vo[j]!);
        out[m + j] = (iw - isn) / this.cj(j, vd);
        out[m + S + j] = w.snubber ? isn / w.snubber.c : 0;
        out[qw + S + j] = iw * iw;
        out[qw + 2 * S + j] = w.rect.rs * iw * iw;
        if (w.snubber) out[qw + 3 * S + 2] = out[qw + 3 * S + 2]! + isn * isn * w.snubber.r;
      }
      out[qw + j] = iw;
    }
    const qb = m + 2 * S;
    let vs = 0;
    if (this.float) {
      // Primary open: the secondaries alone, the primary current held at zero.
      for (let a = 0; a < S; a++) {
        let s = 0;
        for (let b = 0; b < S; b++) s += this.lsinv[a * S + b]! * v[1 + b]!;
        out[1 + a] = s;
      }
      out[0] = 0;
    } else {
      vs = this.vsw(ip);
      v[0] = vs - c.rp * ip - c.vpri;
      for (let a = 0; a < m; a++) {
        let s = 0;
        for (let b = 0; b < m; b++) s += this.linv[a * m + b]! * v[b]!;
        out[a] = s;
      }
    }
    out[qb + 3 * S] = ip;
    // Power into the windings' network at the switch node, and the primary's copper loss.
    out[qb + 3 * S + 1] = vs * ip;
    out[qb + 3 * S + 3] = ip * ip;
  }

  /** Snubber-loss slot is accumulated by f; clear it before each evaluation. */
  private deriv(x: Float64Array, out: Float64Array): void {
    out[this.m + 2 * this.S + 3 * this.S + 2] = 0;
    this.f(x, out);
  }

  /** Voltage the floating switch node takes (primary current zero). */
  floatNode(x: Float64Array): number {
    const { S, c } = this;
    const k = this.k[0]!;
    this.deriv(x, k);
    let v0 = 0;
    for (let b = 0; b < S; b++) v0 += this.Lrow0[1 + b]! * k[1 + b]!;
    return v0 + c.vpri;
  }

  /**
   * Event functions, positive while the present mode holds: a conducting rectifier's current
   * (its stored charge with a transit time), the margin of an off rectifier below the drop
   * its current would need; in a dead time the primary current in its clamping direction, or
   * with the node floating its distance from the rails.
   */
  private g(x: Float64Array, j: number): number {
    const w = this.c.windings[j]!;
    const iw = x[1 + j]!;
    if (this.on[j]) {
      if ((w.rect.tt ?? 0) > 0) return x[this.m + j]!;
      this.onDrop(j, x, iw);
      return this.dId;
    }
    const vd = x[this.m + j]!;
    const isn = w.snubber ? (vd - x[this.m + this.S + j]!) / w.snubber.r : 0;
    const id = Math.max(0, iw - isn);
    const r = w.rect;
    return w.vfScale * (r.n * VT * Math.log1p(id / r.is) + r.rs * id) - vd;
  }

  private gp(x: Float64Array): number {
    if (this.float) {
      const vs = this.floatNode(x);
      return Math.min(vs, this.c.vin - vs);
    }
    return this.pSign * x[0]!;
  }

  /** Toggle rectifier j. */
  private toggle(x: Float64Array, j: number): void {
    const w = this.c.windings[j]!;
    const tt = w.rect.tt ?? 0;
    if (this.on[j]) {
      this.on[j] = 0;
      x[this.m + j] = 0;
      this.ringOff[j] = 1;
    } else {
      this.on[j] = 1;
      const vd = x[this.m + j]!;
      const isn = w.snubber ? (vd - x[this.m + this.S + j]!) / w.snubber.r : 0;
      x[this.m + j] = tt > 0 ? tt * Math.max(0, x[1 + j]! - isn) : 0;
    }
  }

  /** Toggle the primary between clamped by a body diode and floating. */
  private togglePrimary(x: Float64Array): void {
    if (this.float) {
      const vs = this.floatNode(x);
      this.float = false;
      this.pSign = vs < this.c.vin / 2 ? 1 : -1;
    } else this.float = true;
    x[0] = 0;
  }

  /** Per rectifier: it has turned off once in the present sub-interval, and the charge it passed since. */
  ringOff: Uint8Array;
  ringQ: Float64Array;
  private track(x: Float64Array, h: number): void {
    for (let j = 0; j < this.S; j++) {
      const iw = x[1 + j]!;
      if (iw > this.ipk[j]!) this.ipk[j] = iw;
      if (!this.on[j]) {
        const vd = x[this.m + j]!;
        if (vd < this.vrMin[j]!) this.vrMin[j] = vd;
      } else {
        this.onTime[j] = this.onTime[j]! + h;
        if (this.ringOff[j]) this.ringQ[j] = this.ringQ[j]! + Math.max(0, iw) * h;
      }
    }
  }

  private stage(x: Float64Array, h: number, a: readonly number[], upto: number, dst: Float64Array): void {
    const k = this.k;
    const n = x.length;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let q = 0; q < upto; q++) s += a[q]! * k[q]![i]!;
      dst[i] = x[i]! + h * s;
    }
  }

  /** Integrate x (states and quadratures) over [0, dur] in sub-interval seg. */
  run(x: Float64Array, dur: number, seg: Seg): void {
    this.seg = seg;
    const n = this.nx + this.nq;
    const nx = this.nx;
    const [k1, , k3, k4, k5, k6, k7] = this.k as [Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array, Float64Array];
    const y = this.y;
    const yt = this.ytmp;
    const S = this.S;
    const m = this.m;
    const gs = this.gs;
    this.float = false;
    // Conduction after a rectifier has stopped once within a sub-interval is the ring's.
    this.ringOff.fill(0);
    if (seg === 1) {
      this.pSign = x[0]! >= 0 ? 1 : -1;
      if (x[0] === 0) this.float = true;
    }
    const tol = this.tol;
    let t = 0;
    let h = Math.min(this.hlast, dur);
    let fresh = true;
    while (t < dur * (1 - 1e-12)) {
      if (--this.budget < 0) throw new PssBudget();
      // A mode that no longer holds at the start of the step (a second crossing in the last
      // step, or a state set from outside) toggles before stepping.
      let flipped = false;
      for (let j = 0; j < S; j++) {
        gs[j] = this.g(x, j);
        if (gs[j]! < 0) { this.toggle(x, j); gs[j] = this.g(x, j); flipped = true; }
      }
      if (seg === 1) {
        gs[S] = this.gp(x);
        if (gs[S]! < 0) { this.togglePrimary(x); gs[S] = this.gp(x); flipped = true; }
      }
      if (flipped) fresh = true;
      if (t + h > dur) h = dur - t;
      if (fresh) { this.deriv(x, k1); fresh = false; }
      this.stage(x, h, A2, 1, yt); this.deriv(yt, this.k[1]!);
      this.stage(x, h, A3, 2, yt); this.deriv(yt, k3);
      this.stage(x, h, A4, 3, yt); this.deriv(yt, k4);
      this.stage(x, h, A5, 4, yt); this.deriv(yt, k5);
      this.stage(x, h, A6, 5, yt); this.deriv(yt, k6);
      this.stage(x, h, B, 6, y);
      this.deriv(y, k7);
      let err = 0;
      for (let i = 0; i < nx; i++) {
        const e = h * (E[0]! * k1[i]! + E[2]! * k3[i]! + E[3]! * k4[i]! + E[4]! * k5[i]! + E[5]! * k6[i]! + E[6]! * k7[i]!);
        let sc: number;
        if (i < m) sc = this.iscale;
        else if (i < m + S && this.on[i - m]) sc = (this.c.windings[i - m]!.rect.tt ?? 0) * this.iscale + 1e-30;
        else sc = this.vscale;
        const r = Math.abs(e) / (tol * (sc + Math.abs(y[i]!)));
        if (r > err) err = r;
      }
      if (err > 1 && h > 1e-13) {
        h *= Math.max(0.2, 0.9 * Math.pow(err, -0.2));
        continue;
      }
      // The first crossing inside the step, located by shortening the step.
      let theta = 2;
      let which = -1;
      for (let j = 0; j <= S; j++) {
        if (j === S && seg !== 1) continue;
        const g0 = gs[j]!;
        const g1 = j < S ? this.g(y, j) : this.gp(y);
        if (!(g1 < 0)) continue;
        const th = g0 - g1 > 0 ? g0 / (g0 - g1) : 0;
        if (th < theta) { theta = th; which = j; }
      }
      if (which >= 0 && theta < 0.995 && h > 2e-12) {
        h = Math.max(h * theta * 1.0005, 1e-12);
        continue;
      }
      for (let i = 0; i < n; i++) x[i] = y[i]!;
      t += h;
      this.track(x, h);
      if (which >= 0) {
        if (which < S) this.toggle(x, which);
        else this.togglePrimary(x);
        fresh = true;
        h = Math.max(h, 1e-11);
      } else {
        for (let i = 0; i < n; i++) k1[i] = k7[i]!;
        h *= Math.min(5, Math.max(0.2, 0.9 * Math.pow(Math.max(err, 1e-10), -0.2)));
      }
      this.hlast = h;
    }
  }
}

/** Options of the solve. */
export interface PssOptions {
  /** Charge-balance tolerance on each output, relative to its load (default 2e-4). */
  tol?: number;
  maxPeriods?: number;
  /** Hold the outputs at these magnitudes instead of solving their charge balance (checks). */
  fixedVout?: number[];
  /** Integration steps allowed for the whole solve (default 1e6). */
  maxSteps?: number;
  /** Local error tolerance of the integration (default 1e-5). */
  tolInt?: number;
}

/**
 * Periodic steady state: the output voltages where every secondary's average current equals
 * its load and preload, with the fast states periodic.
 */
/** Dense Gaussian elimination with partial pivoting (row-major a, n × n); null if singular. */
function solveLinear(a0: Float64Array, b0: Float64Array, n: number): Float64Array | null {
  const a = Float64Array.from(a0);
  const b = Float64Array.from(b0);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r * n + c]!) > Math.abs(a[p * n + c]!)) p = r;
    if (!(Math.abs(a[p * n + c]!) > 1e-300)) return null;
    if (p !== c) {
      for (let k = 0; k < n; k++) { const t = a[c * n + k]!; a[c * n + k] = a[p * n + k]!; a[p * n + k] = t; }
      const t = b[c]!; b[c] = b[p]!; b[p] = t;
    }
    for (let r = c + 1; r < n; r++) {
      const f = a[r * n + c]! / a[c * n + c]!;
      if (f === 0) continue;
      for (let k = c; k < n; k++) a[r * n + k]! -= f * a[c * n + k]!;
      b[r]! -= f * b[c]!;
    }
  }
  const x = new Float64Array(n);
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r]!;
    for (let k = r + 1; k < n; k++) s -= a[r * n + k]! * x[k]!;
    x[r] = s / a[r * n + r]!;
  }
  return x.every(Number.isFinite) ? x : null;
}

export function solvePss(c: PssCircuit, opts: PssOptions = {}): PssResult {
  try {
    return solveOrbit(c, opts);
  } catch (e) {
    if (!(e instanceof PssBudget)) throw e;
    return { converged: false, periods: NaN, duty: c.duty, residual: Infinity, energyIn: NaN, energyOut: NaN,
      sec: c.windings.map(() => ({ vout: NaN, isec: NaN, iavg: NaN, irms: NaN, ipk: NaN, pRect: NaN, conduction: NaN, vrMax: NaN, pSnubber: NaN, ringShare: NaN })) };
  }
}

function solveOrbit(c: PssCircuit, opts: PssOptions): PssResult {
  const cy = new Cycle(c);
  if (opts.maxSteps) cy.budget = opts.maxSteps;
  if (opts.tolInt) cy.tol = opts.tolInt;
  const { m, S } = cy;
  const T = 1 / c.fsw;
  const td = c.deadTime;
  const tol = opts.tol ?? 2e-4;
  const maxPeriods = opts.maxPeriods ?? 300;
  const n = cy.nx + cy.nq;
  const x = new Float64Array(n);
  let duty = c.duty;
  const lp = c.L[0]![0]!;
  // Turns ratio as the engine reads it, n = M/Lp: the magnetizing current is ip + Σ n·i.
  const nr = c.windings.map((_, j) => c.L[0]![1 + j]! / lp);
  const vo = Float64Array.from(c.windings.map((w, j) => opts.fixedVout?.[j] ?? Math.max(w.vguess, 0.05)));
  // Start: every rectifier off, the magnetizing valley in the primary.
  const im0 = c.ipri + c.windings.reduce((a, w, j) => a + nr[j]! * w.iload, 0);
  const dim = ((c.vin - c.vpri) * duty * T) / lp;
  x[0] = im0 - dim / 2;
  for (let j = 0; j < S; j++) x[m + j] = -(vo[j]! + nr[j]! * (c.vin - c.vpri));
  let periods = 0;
  const load = (j: number) => c.windings[j]!.iload + c.windings[j]!.gpre * vo[j]!;
  const qb = cy.nx;
  const avg = new Float64Array(S);
  const state0 = new Float64Array(cy.nx);
  const hist: Float64Array[] = [];
  const period = (): void => {
    for (let i = cy.nx; i < n; i++) x[i] = 0;
    cy.vrMin.fill(0); cy.ipk.fill(-Infinity); cy.onTime.fill(0); cy.ringQ.fill(0);
    // Every period starts from the same step size, so the same start state gives the same
    // period to the last bit (the finite-difference Jacobian depends on it).
    cy.hlast = T / 400;
    for (let j = 0; j < S; j++) cy.vo[j] = vo[j]!;
    const ton = duty * T;
    cy.run(x, ton, 0);
    cy.run(x, td, 1);
    cy.run(x, T - ton - 2 * td, 2);
    cy.run(x, td, 1);
    periods++;
    for (let j = 0; j < S; j++) avg[j] = x[qb + j]! / T;
  };
  const mag = (y: Float64Array) => { let s = y[0]!; for (let j = 0; j < S; j++) s += nr[j]! * y[1 + j]!; return s; };
  /** Periods at fixed output voltages until the fast states repeat. */
  const settle = (count: number): boolean => {
    hist.length = 0;
    for (let k = 0; k < count && periods < maxPeriods; k++) {
      for (let i = 0; i < cy.nx; i++) state0[i] = x[i]!;
      const m0 = mag(x);
      period();
      // Volt-second balance: trim the duty by the magnetizing current's drift.
      const drift = mag(x) - m0;
      duty -= (drift * lp) / (c.vin * T);
      duty = Math.min(Math.max(duty, 1e-3), 1 - 2 * td * c.fsw - 1e-3);
      // Charge balance on the primary capacitor: the primary winding averages its load.
      const shift = c.ipri - x[qb + 3 * S]! / T;
      x[0]! += shift;
      let change = Math.abs(drift) + Math.abs(shift);
      for (let j = 0; j < S; j++) change += Math.abs(x[1 + j]! - state0[1 + j]!);
      const snap = Float64Array.from(x.subarray(0, cy.nx));
      hist.push(snap);
      if (change < 1e-6 * cy.iscale && k > 0) return true;
      // Aitken extrapolation of each current once three periods converge geometrically.
      if (hist.length >= 3) {
        const [a, b, d] = hist.slice(-3) as [Float64Array, Float64Array, Float64Array];
        for (let i = 1; i < m; i++) {
          const d1 = b[i]! - a[i]!;
          const d2 = d[i]! - b[i]!;
          const r = d2 / d1;
          if (Math.abs(d1) > 1e-12 && r > 0 && r < 0.95) x[i] = d[i]! + (d2 * r) / (1 - r);
        }
        hist.length = 0;
      }
    }
    return false;
  };
  // Warm start: a few periods at the starting voltages with the primary's corrections.
  settle(6);
  // Newton on the whole periodic orbit (shooting): unknowns are the states at the start of
  // the period, the duty and the output voltages; residuals the states' change over one
  // period, the primary's charge balance and each output's. Jacobian by finite differences,
  // then Broyden's rank-one updates (Dennis & Schnabel, Numerical Methods for Unconstrained
  // Optimization and Nonlinear Equations, §8.1), recomputed when a step stalls.
  // A rectifier conducting at the start without a transit time has no state there.
  const modes0 = Uint8Array.from(cy.on);
  const idx: number[] = [];
  for (let i = 0; i < m; i++) idx.push(i);
  for (let j = 0; j < S; j++) if (!modes0[j] || (c.windings[j]!.rect.tt ?? 0) > 0) idx.push(m + j);
  c.windings.forEach((w, j) => { if (w.snubber) idx.push(m + S + j); });
  const nxz = idx.length;
  const nz = nxz + 1 + S;
  const sc = new Float64Array(nz);
  const setScales = () => {
    for (let q = 0; q < nxz; q++) {
      const i = idx[q]!;
      if (i < m) sc[q] = cy.iscale;
      else if (i < m + S && cy.on[i - m]) sc[q] = Math.max((c.windings[i - m]!.rect.tt ?? 0) * cy.iscale, 1e-15);
      else sc[q] = cy.vscale;
    }
    sc[nxz] = 1;
    for (let j = 0; j < S; j++) sc[nxz + 1 + j] = Math.max(vo[j]!, 1);
  };
  const xs = new Float64Array(cy.nx);
  const zOf = (): Float64Array => {
    const z = new Float64Array(nz);
    for (let q = 0; q < nxz; q++) z[q] = x[idx[q]!]! / sc[q]!;
    z[nxz] = duty;
    for (let j = 0; j < S; j++) z[nxz + 1 + j] = vo[j]! / sc[nxz + 1 + j]!;
    return z;
  };
  /** Residual at z from the start modes modes0; leaves the end state in x. */
  const F = (z: Float64Array): Float64Array => {
    for (let i = 0; i < cy.nx; i++) x[i] = xs[i]!;
    for (let q = 0; q < nxz; q++) x[idx[q]!] = z[q]! * sc[q]!;
    duty = Math.min(Math.max(z[nxz]!, 1e-3), 1 - 2 * td * c.fsw - 1e-3);
    for (let j = 0; j < S; j++) vo[j] = Math.max(z[nxz + 1 + j]! * sc[nxz + 1 + j]!, 1e-3);
    cy.on.set(modes0);
    period();
    const r = new Float64Array(nz);
    for (let q = 0; q < nxz; q++) r[q] = x[idx[q]!]! / sc[q]! - z[q]!;
    r[nxz] = (x[qb + 3 * S]! / T - c.ipri) / cy.iscale;
    for (let j = 0; j < S; j++) {
      r[nxz + 1 + j] = opts.fixedVout ? (vo[j]! - opts.fixedVout[j]!) / sc[nxz + 1 + j]! : (avg[j]! - load(j)) / Math.max(load(j), 1e-3);
    }
    return r;
  };
  const norm = (r: Float64Array) => { let a = 0; for (const v of r) a = Math.max(a, Math.abs(v)); return a; };
  const done = (r: Float64Array) => {
    let okx = true;
    for (let q = 0; q <= nxz; q++) if (Math.abs(r[q]!) > 20 * tol) okx = false;
    let okv = true;
    for (let j = 0; j < S; j++) if (Math.abs(r[nxz + 1 + j]!) > tol) okv = false;
    return okx && okv;
  };
  setScales();
  for (let i = 0; i < cy.nx; i++) xs[i] = x[i]!;
  let z = zOf();
  let r = F(z);
  let J: Float64Array | null = null;
  const jac = () => {
    J = new Float64Array(nz * nz);
    for (let k = 0; k < nz && periods < maxPeriods; k++) {
      const zk = Float64Array.from(z);
      const dk = k === nxz ? 1e-4 : 1e-4 * Math.max(1, Math.abs(z[k]!));
      zk[k] = zk[k]! + dk;
      const rk = F(zk);
      for (let q = 0; q < nz; q++) J[q * nz + k] = (rk[q]! - r[q]!) / dk;
    }
  };
  let converged = done(r);
  let residual = norm(r.subarray(nxz + 1));
  let fresh = false;
  while (!converged && periods < maxPeriods) {
    if (!J) { jac(); fresh = true; }
    const step = solveLinear(J!, r.map((v) => -v), nz);
    if (!step) { if (fresh) break; J = null; continue; }
    // Limit the step: outputs by 30 %, the duty by 0.02, states by half their scale.
    let lim = 1;
    for (let q = 0; q < nz; q++) {
      const cap = q < nxz ? 0.5 : q === nxz ? 0.02 : 0.3 * Math.max(z[q]!, 0.05);
      if (Math.abs(step[q]!) * lim > cap) lim = cap / Math.abs(step[q]!);
    }
    const n0 = norm(r);
    let accepted = false;
    for (let ls = 0; ls < 4 && periods < maxPeriods; ls++) {
      const z1 = z.map((v, q) => v + lim * step[q]!);
      const r1 = F(z1);
      const n1 = norm(r1);
      if (n1 < n0 || ls === 3) {
        // Broyden update with the step taken.
        const sv = z1.map((v, q) => v - z[q]!);
        let ss = 0;
        for (const v of sv) ss += v * v;
        if (ss > 0) {
          for (let q = 0; q < nz; q++) {
            let js = 0;
            for (let k = 0; k < nz; k++) js += J![q * nz + k]! * sv[k]!;
            const u = (r1[q]! - r[q]! - js) / ss;
            for (let k = 0; k < nz; k++) J![q * nz + k]! += u * sv[k]!;
          }
        }
        accepted = n1 < n0;
        // The new start: the state z1 began from, with the modes it began in.
        z = z1; r = r1;
        break;
      }
      lim /= 2;
    }
    if (!accepted) { if (fresh) { J = null; fresh = false; } else J = null; }
    else fresh = false;
    converged = done(r);
    residual = norm(r.subarray(nxz + 1));
  }
  // Leave the state of the converged start (x holds the end of the last period).
  F(z);
  const sec: PssSecondary[] = c.windings.map((w, j) => ({
    vout: vo[j]!,
    isec: load(j),
    iavg: avg[j]!,
    irms: Math.sqrt(Math.max(0, x[qb + S + j]! / T)),
    ipk: Math.max(0, cy.ipk[j]!),
    pRect: x[qb + 2 * S + j]! / T,
    conduction: cy.onTime[j]!,
    vrMax: -cy.vrMin[j]!,
    pSnubber: 0,
    ringShare: Math.abs(x[qb + j]!) > 0 ? cy.ringQ[j]! / Math.abs(x[qb + j]!) : 0,
  }));
  const psn = x[qb + 3 * S + 2]! / T;
  if (S > 0 && psn > 0) {
    const withSn = c.windings.map((w, j) => (w.snubber ? j : -1)).filter((j) => j >= 0);
    for (const j of withSn) sec[j]!.pSnubber = psn / withSn.length;
  }
  // Energy check over the last period: what entered the windings at the switch node against
  // the primary output, the secondaries' outputs and every loss element (the inductances and
  // capacitances return what they stored once the orbit is periodic).
  const eIn = x[qb + 3 * S + 1]!;
  let eOut = c.vpri * x[qb + 3 * S]! + c.rp * x[qb + 3 * S + 3]! + psn * T;
  for (let j = 0; j < S; j++) eOut += vo[j]! * x[qb + j]! + x[qb + 2 * S + j]! + c.windings[j]!.r * x[qb + S + j]!;
  return { converged, periods, duty, residual, energyIn: eIn, energyOut: eOut, sec };
}
