/**
 * How the simulated instruments split a measurement into slices computed as
 * its time passes (an integrating meter or a digitizer works in real time):
 * slices of `perSlice` samples and a short last one, so little computation is
 * left when the measurement ends and the reply is not held up by simulation.
 * Returns the slice boundaries, 0 … count.
 */
export function sliceBounds(count: number, perSlice: number, lastSlice: number): number[] {
  const bounds = [0];
  for (let at = perSlice; at < count - lastSlice; at += perSlice) bounds.push(at);
  if (count > lastSlice) bounds.push(count - lastSlice);
  if (count > 0) bounds.push(count);
  return bounds;
}

/**
 * A slice ending this long (wall seconds) before its measurement's end may end late: only the end is
 * timed (the reply), so the wait for an earlier slice is not polled and costs no CPU.
 */
export const UNTIMED_BEFORE_END_S = 0.003;
