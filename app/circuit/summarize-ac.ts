/**
 * Figures of an AC response: pass-band gain, −3 dB points, roll-off, peak and
 * the gain-limit point of the output op-amp.
 */
import { dbFromRatio, HALF_POWER_DB } from '../units';
import { AcSolver } from './ac-solver';
import { bisectLogF } from './bisect-log-f';
import type { AcResponse } from './solve-ac';
import { outputOpAmpIndex } from './output-opamp';
import type { Design } from './types';

export interface AcSummary {
  /**
   * Gain at the lowest frequency when that is within 3 dB of the peak
   * (low-pass-like responses), otherwise the peak gain (high- and band-pass).
   */
  passbandGainDb: number;
  /**
   * Frequencies where the gain crosses pass band − 3.01 dB (half power):
   * bracketed on the sweep grid, then pinned by bisection on log f with the
   * solver (same op-amp mode as the response), so they do not depend on the grid density.
   */
  minus3dbHz: number[];
  /** Least-squares slope of gain over the top decade of the sweep, dB/decade. */
  rolloffDbPerDecade: number | undefined;
  /** Gain-limit point of the output op-amp (the one driving the output node, else the first). */
  gainLimitHz: number | undefined;
  /** Largest gain; an interior grid maximum is refined between its neighbours. */
  peakGainDb: number;
  peakFrequencyHz: number;
}

/**
 * `design` must be the one `response` was computed for: the −3 dB points and
 * the peak are refined by re-solving it (ideal op-amps when the response's
 * main curve equals its ideal curve, the op-amp model otherwise).
 */
export function summarizeAc(design: Design, response: AcResponse): AcSummary {
  const { frequencyHz, gainDb } = response;
  const count = frequencyHz.length;
  let peakIndex = 0;
  for (let i = 1; i < count; i++) if (gainDb[i] > gainDb[peakIndex]) peakIndex = i;
  const solver = new AcSolver(design);
  solver.stamp(isIdealResponse(response) ? 'ideal' : 'model');
  const h = new Float64Array(2);
  const gainAtDb = (frequency: number) => {
    solver.transferAt(frequency, h);
    return dbFromRatio(Math.hypot(h[0], h[1]));
  };
  const peak = refinePeak(frequencyHz, peakIndex, gainDb[peakIndex], gainAtDb);
  const peakGainDb = peak.gainDb;
  const passbandGainDb = gainDb[0] >= peakGainDb + HALF_POWER_DB ? gainDb[0] : peakGainDb;
  const level = passbandGainDb + HALF_POWER_DB;
  const minus3dbHz: number[] = [];
  for (let i = 1; i < count; i++) {
    const a = gainDb[i - 1] - level;
    const b = gainDb[i] - level;
    if ((a > 0 && b <= 0) || (a <= 0 && b > 0)) {
      const lowAbove = a > 0;
      minus3dbHz.push(bisectLogF(frequencyHz[i - 1], frequencyHz[i], BISECTION_STEPS, (frequency) => (gainAtDb(frequency) > level) === lowAbove));
    }
  }
  const opIndex = outputOpAmpIndex(design);
  return {
    passbandGainDb,
    minus3dbHz,
    rolloffDbPerDecade: topDecadeSlope(frequencyHz, gainDb),
    gainLimitHz: opIndex === undefined ? undefined : response.opamps[opIndex]?.gainLimitHz,
    peakGainDb,
    peakFrequencyHz: peak.frequencyHz,
  };
}

const BISECTION_STEPS = 50;
const GOLDEN_STEPS = 60;

/**
 * An interior grid maximum is refined by golden-section search on log f
 * between its neighbours, so a narrow band-pass peak is not under-read.
 */
function refinePeak(frequencyHz: Float64Array, index: number, gridGainDb: number, gainAtDb: (f: number) => number): { frequencyHz: number; gainDb: number } {
  if (index === 0 || index === frequencyHz.length - 1) return { frequencyHz: frequencyHz[index], gainDb: gridGainDb };
  const ratio = (Math.sqrt(5) - 1) / 2;
  let low = Math.log10(frequencyHz[index - 1]);
  let high = Math.log10(frequencyHz[index + 1]);
  let x1 = high - ratio * (high - low);
  let x2 = low + ratio * (high - low);
  let g1 = gainAtDb(10 ** x1);
  let g2 = gainAtDb(10 ** x2);
  for (let k = 0; k < GOLDEN_STEPS; k++) {
    if (g1 < g2) {
      low = x1;
      x1 = x2;
      g1 = g2;
      x2 = low + ratio * (high - low);
      g2 = gainAtDb(10 ** x2);
    } else {
      high = x2;
      x2 = x1;
      g2 = g1;
      x1 = high - ratio * (high - low);
      g1 = gainAtDb(10 ** x1);
    }
  }
  const best = g1 > g2 ? { frequencyHz: 10 ** x1, gainDb: g1 } : { frequencyHz: 10 ** x2, gainDb: g2 };
  return best.gainDb > gridGainDb ? best : { frequencyHz: frequencyHz[index], gainDb: gridGainDb };
}

/** A response computed with ideal op-amps has its main curve equal to the ideal one. */
function isIdealResponse(response: AcResponse): boolean {
  if (response.gainDb === response.idealGainDb) return true;
  for (let i = 0; i < response.gainDb.length; i++) if (response.gainDb[i] !== response.idealGainDb[i]) return false;
  return true;
}

function topDecadeSlope(frequencyHz: Float64Array, gainDb: Float64Array): number | undefined {
  const count = frequencyHz.length;
  if (count < 2) return undefined;
  const top = frequencyHz[count - 1];
  let n = 0;
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < count; i++) {
    if (frequencyHz[i] < top / 10 * (1 - 1e-12)) continue;
    const x = Math.log10(frequencyHz[i]);
    n++;
    sx += x;
    sy += gainDb[i];
    sxx += x * x;
    sxy += x * gainDb[i];
  }
  const denominator = n * sxx - sx * sx;
  if (n < 2 || denominator <= 0) return undefined;
  return (n * sxy - sx * sy) / denominator;
}
