/**
 * American Wire Gauge (ASTM B258): d = 0.127 mm · 92^((36 − n)/39) for gauge n
 * (0 = "1/0", −1 = "2/0", −2 = "3/0", −3 = "4/0"). Annealed copper: ρ = 1/58 Ω·mm²/m at
 * 20 °C (the IEC annealed-copper standard, 100 % IACS), rising 0.393 %/K.
 */
export const COPPER_RHO_20C = 1 / 58; // Ω·mm²/m
export const COPPER_TEMPCO = 0.00393; // 1/K

export const AWG_MIN = -3;
export const AWG_MAX = 44;

/** Bare diameter of gauge n in millimetres. */
export function awgDiameterMm(n: number): number {
  if (!Number.isInteger(n) || n < AWG_MIN || n > AWG_MAX) throw new RangeError(`AWG gauge: ${n} is not an integer in ${AWG_MIN}…${AWG_MAX}`);
  return 0.127 * 92 ** ((36 - n) / 39);
}

/** Copper cross-section of gauge n in mm². */
export function awgAreaMm2(n: number): number {
  const d = awgDiameterMm(n);
  return (Math.PI / 4) * d * d;
}

/** DC resistance of one metre of gauge n at temperature tC (°C), in Ω. */
export function copperOhmsPerMetre(n: number, tC = 20): number {
  return (COPPER_RHO_20C / awgAreaMm2(n)) * (1 + COPPER_TEMPCO * (tC - 20));
}

/** The thinnest gauge (largest n) whose area carries `irms` at `density` A/mm², and how many strands. */
export function wireFor(irms: number, density: number, thinnest = 36): { awg: number; strands: number; areaMm2: number; density: number } {
  if (!(irms >= 0) || !(density > 0)) throw new RangeError(`wire: need irms ≥ 0 and density > 0 (got ${irms}, ${density})`);
  const need = irms / density;
  for (let n = Math.min(thinnest, AWG_MAX); n >= 14; n--) {
    if (awgAreaMm2(n) >= need) return { awg: n, strands: 1, areaMm2: awgAreaMm2(n), density: irms / awgAreaMm2(n) || 0 };
  }
  // Thicker than 14 AWG is hard to wind on a small core: parallel strands of 20 AWG instead.
  const strands = Math.ceil(need / awgAreaMm2(20));
  return { awg: 20, strands, areaMm2: strands * awgAreaMm2(20), density: irms / (strands * awgAreaMm2(20)) };
}
