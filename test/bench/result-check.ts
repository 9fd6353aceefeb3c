/**
 * What the window's check of a reply costs (app/contract/check-reply.ts): a
 * run's detail of 2,000 and of 10,000 points checked against its schema
 * (checkResult('getRun', …)), beside JSON.parse of the same reply as the web
 * host sends it, so the ratio shows what the check adds to receiving it.
 * The detail is the record tests' invented run (test/unit/record/fixtures.ts)
 * with a theory of twice as many frequencies as points, as the service gives
 * (app/read-model/run-detail.ts: every planned step and every measured point).
 * Medians of many repetitions after a warm-up. For reference, one 10,000-value
 * column checked by the one loop the reply schemas use (quantityColumn) and
 * by a valibot schema per element.
 * Target (common practice, no source): the check costs less than the parse.
 * Run: npx tsx test/bench/result-check.ts
 */
import * as v from 'valibot';
import { checkResult } from '../../app/contract/check-reply';
import { quantityColumn } from '../../app/contract/reply-fields';
import type { RunDetail } from '../../app/contract/contract';
import { dbFromRatio, degreesFromRadians } from '../../app/units';
import { median } from '../../app/numeric';
import { acRunDetail, invertingLowPass, NOMINAL_STAGE } from '../unit/record/fixtures';

/** Median wall time of `work` over `repetitions` runs, ms, after a tenth as many unmeasured. */
function medianMs(repetitions: number, work: () => unknown): number {
  for (let i = 0; i < Math.ceil(repetitions / 10); i++) work();
  const times: number[] = [];
  for (let i = 0; i < repetitions; i++) {
    const started = performance.now();
    work();
    times.push(performance.now() - started);
  }
  return median(times);
}

/** A run of about `points` points over 10 Hz … 1 MHz, with the service's theory of twice as many frequencies. */
function detailOf(points: number): RunDetail {
  const detail = acRunDetail({ pointsPerDecade: Math.round((points - 1) / 5), overrangeIndex: 3 });
  const frequencyHz = [...detail.points.stimulus, ...detail.points.stimulus];
  const gain = frequencyHz.map((f) => invertingLowPass(NOMINAL_STAGE, f));
  const ideal = frequencyHz.map((f) => invertingLowPass(NOMINAL_STAGE, f, true));
  const gainDb = gain.map(([re, im]) => dbFromRatio(Math.hypot(re, im)));
  detail.theory = {
    frequencyHz,
    gainDb,
    phaseDeg: gain.map(([re, im]) => degreesFromRadians(Math.atan2(im, re))),
    idealGainDb: ideal.map(([re, im]) => dbFromRatio(Math.hypot(re, im))),
    idealPhaseDeg: ideal.map(([re, im]) => degreesFromRadians(Math.atan2(im, re))),
    bandLowDb: gainDb.map((g) => g - 0.3),
    bandHighDb: gainDb.map((g) => g + 0.3),
  };
  return detail;
}

const pad = (text: string, width: number) => text.padStart(width);
console.log('result-check: getRun reply, median ms (repetitions)');
console.log(`${pad('points', 7)} ${pad('reply KiB', 10)} ${pad('JSON.parse', 11)} ${pad('check', 8)} ${pad('check/parse', 12)} ${pad('structuredClone', 16)}`);
for (const [points, repetitions] of [[2_000, 300], [10_000, 100]] as const) {
  const detail = detailOf(points);
  const text = JSON.stringify({ result: detail });
  const arrived = (JSON.parse(text) as { result: unknown }).result;
  checkResult('getRun', arrived); // refuses, and so ends the benchmark, if the fixture does not fit
  const parseMs = medianMs(repetitions, () => JSON.parse(text));
  const checkMs = medianMs(repetitions, () => checkResult('getRun', arrived));
  const cloneMs = medianMs(repetitions, () => structuredClone(detail));
  console.log(
    `${pad(String(detail.points.step.length), 7)} ${pad((text.length / 1024).toFixed(0), 10)} ${pad(parseMs.toFixed(2), 11)} ${pad(checkMs.toFixed(2), 8)} ${pad(checkMs < parseMs ? `${(checkMs / parseMs).toFixed(2)} ✓` : `${(checkMs / parseMs).toFixed(2)} ✗`, 12)} ${pad(cloneMs.toFixed(2), 16)}`,
  );
}

const column = (JSON.parse(JSON.stringify(detailOf(10_000).points.gainDb)) as unknown[]).slice(0, 10_000);
const perElement = v.array(v.nullable(v.number()));
const loopMs = medianMs(300, () => v.safeParse(quantityColumn, column));
const perElementMs = medianMs(300, () => v.safeParse(perElement, column));
console.log(`one 10,000-value column: one loop (quantityColumn) ${loopMs.toFixed(3)} ms, a schema per element (v.array(v.nullable(v.number()))) ${perElementMs.toFixed(3)} ms`);
