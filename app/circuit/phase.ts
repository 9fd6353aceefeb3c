/** Phase columns: wrapped start, then continuous, using the one unwrap in app/units. */
import { degreesFromRadians, unwrapPhaseDeg, wrapPhaseDeg } from '../units';

/** Fills phaseDeg from re/im columns; the first point lies in (−180°, 180°], the rest are continuous. */
export function continuousPhaseDeg(re: Float64Array, im: Float64Array, phaseDeg: Float64Array): Float64Array {
  for (let i = 0; i < re.length; i++) phaseDeg[i] = degreesFromRadians(Math.atan2(im[i], re[i]));
  if (phaseDeg.length > 0) phaseDeg[0] = wrapPhaseDeg(phaseDeg[0]);
  return unwrapPhaseDeg(phaseDeg);
}
