/**
 * The part library's classes and what each class's parameters mean, as plain data with no code
 * behind it: the library checks (library.ts) read it, and the window reads CLASS_PARAMS through
 * api/window-shared.ts without pulling the stage engine into its bundle.
 */
export type PartClass =
  | 'controller'
  | 'switch'
  | 'ldo'
  | 'rectifier'
  | 'cap-ceramic'
  | 'cap-aluminium'
  | 'cap-polymer'
  | 'resistor'
  | 'inductor'
  | 'magnetic-custom'
  | 'load-switch'
  | 'iso-module';

export const PART_CLASSES: readonly PartClass[] = [
  'controller', 'switch', 'ldo', 'rectifier', 'cap-ceramic', 'cap-aluminium', 'cap-polymer', 'resistor', 'inductor', 'magnetic-custom',
  'load-switch',
  'iso-module',
];

export type ParamValue = number | string;


export interface ParamSpec {
  key: string;
  kind: 'number' | 'string';
  /** Unit the number is stored in (base SI), for documentation and headers. */
  unit?: string;
  required: boolean;
  min?: number;
  max?: number;
  doc: string;
}

const num = (key: string, unit: string, doc: string, min = 0, max = Infinity, required = true): ParamSpec =>
  ({ key, kind: 'number', unit, required, min, max, doc });
const str = (key: string, doc: string, required = true): ParamSpec => ({ key, kind: 'string', required, doc });
const pkg = str('package', 'package name (generic outline)');
/** What procurement orders: empty for a generic row, which the BOM labels generic. */
const maker = str('manufacturer', 'manufacturer (empty: a generic row, to be chosen by procurement)', false);
const mpn = str('partNumber', 'manufacturer part number (empty: a generic row)', false);

/** What each class's params mean. Numbers are base SI (V, A, Ω, F, H, s, W, K/W). */
export const CLASS_PARAMS: Record<PartClass, ParamSpec[]> = {
  controller: [
    pkg,
    num('iMax', 'A', 'largest output current it is rated for', 0.001, 1000),
    num('vinMax', 'V', 'highest input voltage', 1, 2000),
    num('iq', 'A', 'quiescent current from Vin', 0, 1),
    num('tonMin', 's', 'minimum on-time', 0, 1e-3),
    num('dMax', '', 'maximum duty cycle', 0.05, 1),
    num('integrated', '', '1 = switches inside (no external switches), 0 = drives external switches', 0, 1),
    num('forcedPwm', '', '1 = can run forced PWM with a synchronous low-side switch (needed by coupled-winding stages)', 0, 1),
    num('rdsHs', 'Ω', 'integrated high-side on-resistance at 25 °C (integrated = 1)', 0, 10, false),
    num('rdsLs', 'Ω', 'integrated low-side on-resistance at 25 °C (integrated = 1)', 0, 10, false),
    num('negLimit', 'A', 'low-side negative current limit', 0, 100, false),
    num('thetaJA', 'K/W', 'junction-to-ambient thermal resistance', 1, 1000),
    num('vinMin', 'V', 'lowest input voltage it regulates from', 0, 2000, false),
    num('uvlo', 'V', 'undervoltage-lockout rising threshold', 0, 2000, false),
    num('vref', 'V', 'feedback reference voltage', 0.1, 10, false),
    num('vrefTolerance', '', 'reference tolerance over temperature, as a ratio (0.01 = ±1 %)', 0, 0.2, false),
    num('iLimit', 'A', 'peak (cycle-by-cycle) current limit', 0, 1000, false),
    str('topology', 'converter topology it is made for: buck (default when empty), boost, inverting, buck-boost-4s', false),
    maker, mpn,
  ],
  switch: [
    pkg,
    num('vds', 'V', 'drain-source voltage rating', 1, 2000),
    num('id', 'A', 'continuous drain current rating', 0.01, 1000),
    num('rdsOn', 'Ω', 'on-resistance at 25 °C', 1e-5, 100),
    num('qg', 'C', 'total gate charge', 0, 1e-6),
    num('coss', 'F', 'output capacitance', 0, 1e-8),
    num('thetaJA', 'K/W', 'junction-to-ambient thermal resistance', 1, 1000),
    num('tr', 's', 'switch-node rise time in the circuit', 0, 1e-6, false),
    num('tf', 's', 'switch-node fall time in the circuit', 0, 1e-6, false),
    num('rdsTempFactor', '', 'Rds(on) at the hot junction over its 25 °C value (common practice 1.3–1.5)', 1, 3, false),
    maker, mpn,
  ],
  ldo: [
    pkg,
    num('iMax', 'A', 'rated output current', 0.001, 100),
    num('vinMax', 'V', 'highest input voltage', 1, 1000),
    num('dropout', 'V', 'dropout at rated current', 0, 5),
    num('iq', 'A', 'quiescent current', 0, 0.1),
    num('psrrDb', 'dB', 'ripple rejection at a few hundred kHz', 0, 120),
    num('thetaJA', 'K/W', 'junction-to-ambient thermal resistance (JEDEC JESD51-2 style figure)', 1, 1000),
    num('negative', '', '1 = negative-voltage regulator', 0, 1, false),
    num('accuracy', '', 'output accuracy over line, load and temperature, as a ratio', 0, 0.2, false),
    num('dropoutFloor', 'V', 'dropout at no load', 0, 5, false),
    maker, mpn,
  ],
  rectifier: [
    pkg,
    num('vr', 'V', 'reverse voltage rating', 1, 5000),
    num('if', 'A', 'average forward current rating', 0.001, 1000),
    num('vf', 'V', 'forward drop at rated current', 0.05, 5),
    num('thetaJA', 'K/W', 'junction-to-ambient thermal resistance', 1, 1000),
    num('cj', 'F', 'junction capacitance at a few volts reverse', 0, 1e-8, false),
    num('trr', 's', 'reverse-recovery time (0 for a Schottky)', 0, 1e-5, false),
    maker, mpn,
  ],
  'cap-ceramic': [
    pkg,
    str('dielectric', 'dielectric code (class 1 or class 2)'),
    num('vRated', 'V', 'rated voltage', 1, 10000),
    num('cMin', 'F', 'smallest value offered in this package and rating', 0, 1),
    num('cMax', 'F', 'largest value offered in this package and rating', 0, 1),
    num('esr', 'Ω', 'typical ESR', 0, 100, false),
    num('iRipple', 'A', 'ripple current rating', 0, 100, false),
    maker, mpn,
  ],
  'cap-aluminium': [
    pkg,
    num('vRated', 'V', 'rated voltage', 1, 1000),
    num('cMin', 'F', 'smallest value offered', 0, 10),
    num('cMax', 'F', 'largest value offered', 0, 10),
    num('esr', 'Ω', 'typical ESR', 0, 100),
    num('iRipple', 'A', 'ripple current rating', 0, 100, false),
    maker, mpn,
  ],
  'cap-polymer': [
    pkg,
    num('vRated', 'V', 'rated voltage', 1, 1000),
    num('cMin', 'F', 'smallest value offered', 0, 10),
    num('cMax', 'F', 'largest value offered', 0, 10),
    num('esr', 'Ω', 'typical ESR', 0, 100),
    num('iRipple', 'A', 'ripple current rating', 0, 100, false),
    maker, mpn,
  ],
  resistor: [
    pkg,
    num('power', 'W', 'rated power', 0.001, 1000),
    num('tolerance', '', 'tolerance as a ratio (0.01 = 1 %)', 0, 0.5),
    maker, mpn,
  ],
  inductor: [
    pkg,
    num('lMin', 'H', 'smallest inductance offered in this size', 0, 1),
    num('lMax', 'H', 'largest inductance offered in this size', 0, 1),
    num('iSat', 'A', 'saturation current at the largest value (scales as √(lMax/L) below it)', 0.001, 1000),
    num('dcr', 'Ω', 'DC resistance at the largest value (scales as √(L/lMax))', 0, 100),
    num('iRms', 'A', 'RMS (heating) current rating at the largest value', 0, 1000, false),
    maker, mpn,
  ],
  'magnetic-custom': [
    pkg,
    num('maxWindings', '', 'most windings (primary included) the former takes', 2, 12),
    num('pMax', 'W', 'largest throughput power', 0.1, 10000),
    num('costPerWinding', '', 'estimated cost added per winding beyond the primary', 0, 1e6),
    num('isolation', '', 'best isolation class the construction supports: 0 functional, 1 basic, 2 reinforced', 0, 2),
    maker, mpn,
  ],
  'load-switch': [
    pkg,
    num('iMax', 'A', 'largest continuous current', 0.001, 100),
    num('vinMax', 'V', 'highest input voltage', 0.5, 100),
    num('ron', 'Ω', 'on-resistance at 25 °C', 1e-4, 10),
    num('thetaJA', 'K/W', 'junction-to-ambient thermal resistance', 1, 1000),
    num('iq', 'A', 'quiescent current when on', 0, 0.01, false),
    maker, mpn,
  ],
  'iso-module': [
    pkg,
    num('vinNom', 'V', 'nominal input (the module runs from it ±10 %)', 1, 1000),
    num('ratio', '', 'output over input at full load', 0.01, 100),
    num('pRated', 'W', 'rated output power', 0.01, 1000),
    num('loadReg', '', 'output rise from full load to 10 % load, as a ratio', 0, 1),
    num('minLoad', '', 'minimum load as a share of rated', 0, 1),
    num('etaFull', '', 'efficiency at full load', 0.05, 1),
    num('pNoLoad', 'W', 'input power at no load', 0, 100),
    num('isolation', '', 'isolation class of the barrier: 0 functional, 1 basic, 2 reinforced', 0, 2),
    num('workingVoltage', 'V', 'working voltage the barrier is rated for', 0, 100000),
    num('thetaJA', 'K/W', 'hot-spot rise per watt of loss', 1, 1000),
    num('ripple', 'V', 'output ripple peak-to-peak at full load', 0, 10, false),
    maker, mpn,
  ],
};
