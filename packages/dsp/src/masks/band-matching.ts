import { OCTAVE_RATIO, REFERENCE_FREQUENCY, fractionalOctaveBands, octaveBandCenter, type OctaveBand, type OctaveFraction } from '../measures/octave-bands.js';
import { precondition, requirePositive } from '../util/preconditions.js';

/**
 * The IEC 61260-1 base-10 band (1/b octave) whose exact mid-band frequency is nearest to `hz`
 * on a log axis, so a mask may name a band by its nominal label (31.5, 1250) or its exact
 * centre (31.62, 1258.9). Inverts f_m = f_r·G^(x/b) (odd b) or f_r·G^((2x+1)/(2b)) (even b).
 * @throws RangeError for an unsupported fraction or a non-positive frequency
 * @see IEC 61260-1:2014, §5.4 (mid-band frequencies) and §5.5 (band edges)
 */
export function nearestOctaveBand(fraction: OctaveFraction, hz: number): OctaveBand {
  const fn = 'nearestOctaveBand';
  precondition([1, 3, 6, 12].includes(fraction), fn, `fraction must be 1, 3, 6 or 12 (got ${fraction})`);
  requirePositive(hz, fn, 'hz');
  const steps = (fraction * Math.log(hz / REFERENCE_FREQUENCY)) / Math.log(OCTAVE_RATIO);
  const index = fraction % 2 === 1 ? Math.round(steps) : Math.round(steps - 0.5);
  const centre = octaveBandCenter(fraction, index);
  const band = fractionalOctaveBands(fraction, centre, centre)[0];
  precondition(band !== undefined, fn, `no band found at ${centre} Hz`);
  return band;
}
