/**
 * BenchClock: bench time runs timeScale× faster than wall time, for both
 * nowS and sleepS (our definition, app/bench/clock.ts; no external source).
 */
import { describe, expect, it } from 'vitest';
import { realClock, scaledClock } from '../../../app/bench';

describe('BenchClock', () => {
  it('a ×100 clock sleeps one bench second in about 10 ms of wall time and advances ~1 s', async () => {
    const clock = scaledClock(100);
    const startBenchS = clock.nowS();
    const startWallMs = performance.now();
    await clock.sleepS(1);
    const wallMs = performance.now() - startWallMs;
    const benchS = clock.nowS() - startBenchS;
    expect(wallMs).toBeGreaterThanOrEqual(9);
    // Generous upper bound: a loaded CI machine delays timers; the ratio below is the real check.
    expect(wallMs).toBeLessThan(2000);
    expect(benchS).toBeGreaterThanOrEqual(0.99);
    expect(benchS / (wallMs / 1000)).toBeCloseTo(100, 0);
  });

  it('the real clock runs at wall speed', async () => {
    expect(realClock.timeScale).toBe(1);
    const start = realClock.nowS();
    await realClock.sleepS(0.02);
    expect(realClock.nowS() - start).toBeGreaterThanOrEqual(0.019);
  });

  it('never ends a sleep before its deadline, polled or coarse (a settling cut short would corrupt a capture)', async () => {
    for (const coarse of [false, true]) {
      for (const seconds of [0.0005, 0.0015, 0.0025, 0.0037, 0.011]) {
        const start = performance.now();
        await realClock.sleepS(seconds, { coarse });
        expect(performance.now() - start, `${seconds} s, coarse ${coarse}`).toBeGreaterThanOrEqual(seconds * 1000);
      }
    }
  });

  it('refuses a zero, negative or infinite scale', () => {
    for (const bad of [0, -1, Infinity, Number.NaN]) expect(() => scaledClock(bad)).toThrow(RangeError);
  });
});
