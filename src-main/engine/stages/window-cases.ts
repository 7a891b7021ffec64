/**
 * What a stage kind gives the worst-case window computation (windows.ts) through its
 * registry entry (registry.ts, `window`): its output values at one corner and the tolerance
 * cases that bound them. The pieces several kinds share (the tolerance draw, the setpoint of
 * a reference and an E96 divider, the two bounding cases) live here, so a kind folder needs
 * nothing from windows.ts itself.
 */
import type { DividerChoice } from '../eseries.ts';

/** Tolerance draws: each in [−1, 1], scaled by the design's own tolerances. */
export interface ToleranceDraw {
  vref: number;
  rTop: number;
  rBottom: number;
  vf: number;
  accuracy: number;
}

/** One tolerance case of the corner set: the draw and how a corner's label names it. */
export interface ToleranceCase {
  x: ToleranceDraw;
  label: string;
}

/** An output's value at one corner as [low, high] magnitudes (its DC voltage ∓ half its ripple). */
export interface OutputSpan {
  lo: number;
  hi: number;
}

/** A kind's entry for the window computation. */
export interface KindWindow<D> {
  /** Every output's span (magnitudes; windows.ts signs a negative output) at one input, loads and draw. */
  outputsAt(d: D, vin: number, iout: number[], x: ToleranceDraw): OutputSpan[];
  /** The tolerance cases that bound every output, in the order they are evaluated. */
  cases(d: D): ToleranceCase[];
  /** The kind has a rectifier drop the Monte Carlo draws (`x.vf`). */
  rectifierDrop?: boolean;
  /**
   * The kind's magnetic has tolerances of its own: its corners (the nominal design itself
   * among them) and a Monte Carlo draw inside them. `u` draws in [−1, 1], `rnd` in [0, 1).
   */
  magnetic?: {
    corners(d: D): { design: D; label: string }[];
    draw(d: D, u: () => number, rnd: () => number): D;
  };
}

/** A reference and divider's setpoint under a draw. */
export function setpoint(div: DividerChoice, vrefTol: number, x: ToleranceDraw): number {
  const vref = div.vref * (1 + vrefTol * x.vref);
  const rt = div.rTop * (1 + div.tolerance * x.rTop);
  const rb = div.rBottom * (1 + div.tolerance * x.rBottom);
  return vref * (1 + rt / rb);
}

/**
 * The two cases that bound a regulated stage's outputs: every output rises with the setpoint
 * and falls with the rectifier drop, so "setpoint low, drop high" and "setpoint high, drop
 * low" bound them all. `what` names the setpoint's tolerance ("reference and divider",
 * "accuracy"); `rectifierDrop` adds the drop to the draw and the label.
 */
export function boundingCases(what: string, rectifierDrop = false): ToleranceCase[] {
  return [-1, 1].map((s) => {
    const f = rectifierDrop ? -s : 0;
    return {
      x: { vref: s, rTop: s, rBottom: -s, vf: f, accuracy: s },
      label: `${what} ${s < 0 ? 'low' : 'high'}${rectifierDrop ? `, rectifier drop ${f < 0 ? 'low' : 'high'}` : ''}`,
    };
  });
}

/** The one case of a stage without a setpoint of its own (its output follows its input). */
export function singleCase(label: string): ToleranceCase[] {
  return [{ x: { vref: 1, rTop: 1, rBottom: -1, vf: 0, accuracy: 1 }, label }];
}
