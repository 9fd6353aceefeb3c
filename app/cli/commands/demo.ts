import type { CommandSpec } from '../args';
import { optionString } from '../args';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';
import { makeDesignFromTemplate } from '../../circuit';
import { DATABASE_OPTION, TIME_SCALE_OPTION, timeScaleFrom } from '../common-options';
import { followRun } from '../sweep/follow-run';
import { figureLines } from '../sweep/summary-text';
import { formatEngineering, formatFixed } from '../../units';
import type { RunDetail, SweepRequest } from '../../contract/contract';

/**
 * The invented scenario. Nothing here is a measurement of a real board: the
 * workshop, the people and the parts are made up, and the instruments are the
 * simulated bench.
 */
const SCENARIO = {
  lab: 'the Juniper Yard electronics workshop (an invented lab)',
  design: { rn: 1e3, rf: 100e3, cf: 100e-12, gbw: 1e6 },
  builds: [
    { label: 'unit 1', notes: 'Invented demo build: parts as drawn, measured with a hand-held meter.', actualValues: { RN: 1003, RF: 99.6e3, CF: 102e-12 } },
    { label: 'unit 2', notes: 'Invented demo build: a 1 nF capacitor was fitted where 100 pF is drawn.', actualValues: { RN: 998, RF: 100.4e3, CF: 1.01e-9 } },
  ],
};

export const demoCommand: CommandSpec = {
  name: 'demo',
  summary: 'Invented scenario on the simulated bench: one design, two builds that differ, swept and compared',
  usage: '[--db PATH] [--time-scale X]',
  options: [DATABASE_OPTION, TIME_SCALE_OPTION],
  details: `
Starts the simulated bench (simulated instruments on 127.0.0.1, ephemeral ports), stores an invented design
and two builds of it in the database, sweeps both and prints how they differ. All data is simulated.
--time-scale 20 shows it in a few seconds.`,
  async run(parsed) {
    process.stderr.write(`${SAFETY_NOTICE_SHORT}\n\n`);
    const out = (line = '') => process.stdout.write(line + '\n');
    const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')), {
      maxStimulusVpp: 1,
      simulatedBench: { timeScale: timeScaleFrom(parsed), noiseVrms: 2e-4, latencyS: 0.001 },
    });
    try {
      out('Rolloff demo — INVENTED SCENARIO, SIMULATED DATA (no real board or instrument is involved).');
      out(`Setting: ${SCENARIO.lab} drew an inverting preamp (RN 1 kΩ, RF 100 kΩ, CF 100 pF across RF,`);
      out('generic op-amp with 1 MHz gain-bandwidth) and built it twice. Both builds are swept on the simulated bench.');
      out();
      const file = makeDesignFromTemplate('inverting-lowpass', SCENARIO.design) as { name: string; description?: string };
      file.name = 'Demo preamp (invented)';
      file.description = 'Invented demo design; not a real product.';
      const design = await service.saveDesign(file);
      const details: RunDetail[] = [];
      for (const spec of SCENARIO.builds) {
        const build = await service.createBuild({ designId: design.id, label: spec.label, notes: spec.notes, actualValues: spec.actualValues });
        await service.startSimulatedBenchForBuild(build.id);
        const request: SweepRequest = {
          buildId: build.id, kind: 'ac', from: 100, to: 1e6, pointsPerDecade: 8, spacing: 'log', amplitude: { mode: 'auto' },
          measurement: 'scope', minCycles: 5, averages: 1, refine: true, operator: 'demo', notes: 'Invented demo run on the simulated bench.',
          limits: { maxDeviationDb: 0.5, cornerTolerance: 0.1 },
        };
        const run = await service.startRun(request);
        out(`Sweeping ${spec.label} (run ${run.id}, simulated)…`);
        await followRun(service, run.id);
        const detail = await service.getRun(run.id);
        details.push(detail);
        out(`  ${spec.label}: ${spec.notes.replace('Invented demo build: ', '')}`);
        for (const line of figureLines(detail.figures, { gainLimitHz: detail.theoryGainLimitHz, minus3dbHz: detail.theoryMinus3dbHz })) out(`    ${line}`);
        if (detail.verdict) out(`    verdict against its own parts' theory: ${detail.verdict.pass ? 'PASS' : 'FAIL'}`);
        out();
      }

      const [a, b] = details;
      const comparison = await service.compareRuns(details.map((d) => d.id), a.id);
      const hz = (v: number | undefined) => (v === undefined ? '—' : formatEngineering(v, 'Hz'));
      out('How the builds differ (unit 2 against unit 1):');
      out(`  −3 dB point      ${hz(a.figures.minus3dbHz[0])} → ${hz(b.figures.minus3dbHz[0])}`);
      out(`  gain-limit point ${hz(a.figures.gainLimitHz)} → ${hz(b.figures.gainLimitHz)}`);
      const worst = comparison.differences[1];
      const largest = worst.deltaDb.reduce((best, d, i) => (Number.isFinite(d) && Math.abs(d) > Math.abs(best.d) ? { d, f: worst.stimulus[i] } : best), { d: 0, f: NaN });
      out(`  largest gain difference ${formatFixed(largest.d, 1)} dB at ${hz(largest.f)}`);
      out();
      const cornerRatio = (a.figures.minus3dbHz[0] ?? NaN) / (b.figures.minus3dbHz[0] ?? NaN);
      out(`Reading: unit 2's −3 dB point is ${cornerRatio.toFixed(1)}× lower than unit 1's, and it agrees with the theory of its`);
      out('recorded parts: the roll-off follows 1/(2π·RF·CF), and unit 2 carries a 1.01 nF part where 100 pF is drawn.');
      out('With the larger CF the stage asks the op-amp for gain only at low frequencies, so unit 2 meets the');
      out('op-amp\'s limit far higher up. Unit 1 follows its design up to the gain-limit point, where the op-amp\'s');
      out('open-loop gain takes over from the feedback network.');
      out();
      out(`Stored in ${service.databaseLocation}. Look closer with: rolloff show ${a.id} --list-points --db ${service.databaseLocation}`);
      out(`Export a record with: rolloff export ${a.id} ${b.id} --pdf --db ${service.databaseLocation}`);
      return 0;
    } finally {
      await service.close();
    }
  },
};
