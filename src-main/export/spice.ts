/**
 * SPICE netlists of the switching stages, open loop at the duty the engine computes, for
 * ngspice batch mode (`ngspice -b file.cir`). Pure functions returning text. The writers
 * live in the kinds' folders (engine/stages/<kind>/, registered as each kind's `netlist`);
 * this module re-exports the buck's and the coupled-winding buck's, and the comment-line
 * sanitiser, for the exports, the CLI and the reference tests.
 *
 * What the netlists model: the two switches as voltage-controlled switches with their hot
 * on-resistance and body diodes, driven by PULSE sources with the controller's dead time;
 * the inductor or coupled magnetic (K statements from the coupling factors, winding
 * resistances), rectifier diodes with the design's diode model, output capacitors with ESR,
 * loads and preloads as resistors. Not modelled (an ideal input source, instant switch
 * transitions): switching overlap, output capacitance, gate drive, core and quiescent
 * losses, input capacitor.
 *
 * Measurements (`.meas tran`, over the last cycles): v_out<i>, the average of output i
 * (signed, against its own return), vpp_out<i> its peak-to-peak ripple, and i_in, the
 * average current drawn from the input source (negative by the SPICE sign convention).
 */
export { spiceComment, buckNetlist, type NetlistOptions } from '../engine/stages/buck/netlist.ts';
export { coupledBuckNetlist } from '../engine/stages/cwbuck/netlist.ts';
