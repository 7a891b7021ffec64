/**
 * The Y-capacitor check needs the rms of the AC voltage across the barrier (I = 2π·f·C·V rms).
 * A domain's working voltage is entered as the applicable standard states it: an rms value, a
 * peak value or a DC value. Only an rms value can be used as it stands; the user says which it
 * is and confirms the pre-filled value.
 */
import { q } from './fmt.ts';

export type WorkingVoltageForm = 'rms' | 'peak' | 'dc';

export const WORKING_VOLTAGE_FORMS: { id: WorkingVoltageForm; label: string }[] = [
  { id: 'rms', label: 'an rms value' },
  { id: 'peak', label: 'the peak of a sine' },
  { id: 'dc', label: 'a DC value' },
];

/**
 * The value to pre-fill as "V rms" and the note saying where it came from. rms: as it is; peak
 * of a sine: V peak / √2 (the rms of a sine, any circuits textbook); DC: nothing, since a steady
 * DC voltage drives no steady current through a capacitor; the AC across the barrier (mains rms,
 * or the converter's common-mode swing) is what the check needs.
 */
export function rmsPrefill(workingVoltage: number, form: WorkingVoltageForm): { text: string; note: string } {
  const wv = q(workingVoltage, 'voltage', 4);
  switch (form) {
    case 'rms':
      return { text: wv, note: `the working voltage ${wv}, an rms value, as it stands` };
    case 'peak': {
      const rms = workingVoltage / Math.SQRT2;
      return { text: q(rms, 'voltage', 4), note: `the working voltage ${wv} peak ÷ √2 = ${q(rms, 'voltage', 4)} rms, assuming a sine` };
    }
    case 'dc':
      return { text: '', note: `a DC working voltage (${wv}) drives no steady current through a Y capacitor: enter the rms of the AC across the barrier (e.g. the mains rms, or the common-mode swing of the converter)` };
  }
}
