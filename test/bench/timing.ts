/** Wall time of one piece of work (ms), for the benchmarks' figures. */
export async function timeMs(work: () => unknown): Promise<number> {
  const start = performance.now();
  await work();
  return performance.now() - start;
}
