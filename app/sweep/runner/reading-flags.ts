/** Meter readings of one step: the values to average and the point flags the others raise. */
import type { Reading } from '../../scpi/reading';
import { PointFlag } from '../../contract/contract';

export function splitReadings(readings: Reading[]): { okValues: number[]; flags: number } {
  const okValues = readings.filter((r) => r.flag === 'ok').map((r) => r.value);
  let flags = 0;
  if (readings.some((r) => r.flag === 'overrange')) flags |= PointFlag.overrange;
  if (readings.some((r) => r.flag === 'nan')) flags |= PointFlag.notANumber;
  return { okValues, flags };
}
