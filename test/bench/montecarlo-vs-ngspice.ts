/**
 * Benchmark: Monte Carlo of 1000 samples × 201 log points (10 Hz – 1 MHz) on
 * the unity-gain second-order low-pass (Sallen–Key template, R ±1 %, C ±5 %,
 * uniform), done by Rolloff in process and by ngspice in its own control
 * language (a repeat loop with alter and sunif, one .ac per sample), side by
 * side in one run. Both use the same single-pole op-amp macro-model.
 *
 * Run: npx tsx test/bench/montecarlo-vs-ngspice.ts
 * Times are wall-clock, best of REPEATS; ngspice's includes its process start
 * and netlist parsing (shown separately), Rolloff's includes the percentiles.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { makeDesignFromTemplate, monteCarloAc, parseDesign, spiceNames, toSpiceNetlist, type Design } from '../../app/circuit';
import { logGrid } from '../../app/units';

const SAMPLES = 1000;
const FROM_HZ = 10;
const TO_HZ = 1e6;
const PER_DECADE = 40;
const REPEATS = 3;

const design: Design = parseDesign(
  makeDesignFromTemplate('sallen-key-lowpass-unity', { rtol: 0.01, ctol: 0.05 }),
  'sallen-key-lowpass-unity',
);
const frequencies = logGrid(FROM_HZ, TO_HZ, PER_DECADE);

function timeRolloffMs(): number {
  const start = performance.now();
  const band = monteCarloAc(design, frequencies, { samples: SAMPLES, seed: 1, distribution: 'uniform' });
  const elapsed = performance.now() - start;
  if (band.gainLowDb.length !== frequencies.length) throw new Error('unexpected band length');
  return elapsed;
}

/** The netlist plus a .control loop doing the same Monte Carlo in ngspice. */
function ngspiceDeck(samples: number): string {
  const names = spiceNames(design);
  const netlist = toSpiceNetlist(design, { kind: 'op' }).replace(/^\.op\n/m, '').replace(/^\.end\n$/m, '');
  const alters = design.parts
    .filter((p) => 'tolerance' in p && p.tolerance)
    .map((p) => `  alter ${names.element(p.id)} = unif(${(p as { value: number }).value}, ${(p as { tolerance: number }).tolerance})`);
  return [
    netlist.trimEnd(),
    '.control',
    // sunif(0) is uniform on [−1, 1): the same distribution as Rolloff's 'uniform'.
    'define unif(nom, rvar) (nom + (nom*rvar) * sunif(0))',
    'setplot new',
    'set scratch = $curplot',
    'let run = 0',
    'setseed 1',
    `repeat ${samples}`,
    ...alters,
    `  ac dec ${PER_DECADE} ${FROM_HZ} ${TO_HZ}`,
    '  set acplot = $curplot',
    '  setplot $scratch',
    '  let run = run + 1',
    '  set run = "$&run"',
    `  let vout{$run} = {$acplot}.v(${names.node(design.output)})`,
    '  destroy $acplot',
    'end',
    'print run',
    'quit',
    '.endc',
    '.end',
    '',
  ].join('\n');
}

function timeNgspiceMs(deckPath: string, expectedRuns: number): number {
  const start = performance.now();
  const result = spawnSync('ngspice', ['-b', deckPath], { encoding: 'utf8' });
  const elapsed = performance.now() - start;
  if (result.status !== 0) throw new Error(`ngspice failed (${result.status}): ${result.stderr}`);
  const runs = /run = ([\d.e+]+)/.exec(result.stdout);
  if (!runs || Number(runs[1]) !== expectedRuns) throw new Error(`ngspice did not complete ${expectedRuns} runs:\n${result.stdout.slice(-500)}`);
  return elapsed;
}

const dir = mkdtempSync(join(tmpdir(), 'rolloff-bench-mc-'));
try {
  const fullDeck = join(dir, 'montecarlo.cir');
  const emptyDeck = join(dir, 'startup.cir');
  writeFileSync(fullDeck, ngspiceDeck(SAMPLES));
  writeFileSync(emptyDeck, ngspiceDeck(0));

  const rolloffMs: number[] = [];
  const ngspiceMs: number[] = [];
  const startupMs: number[] = [];
  for (let i = 0; i < REPEATS; i++) {
    rolloffMs.push(timeRolloffMs());
    ngspiceMs.push(timeNgspiceMs(fullDeck, SAMPLES));
    startupMs.push(timeNgspiceMs(emptyDeck, 0));
  }
  const best = (values: number[]) => Math.min(...values);
  const ratio = best(rolloffMs) / best(ngspiceMs);
  const lines = [
    `Monte Carlo: ${design.name}, ${SAMPLES} samples × ${frequencies.length} log points (${FROM_HZ} Hz – ${TO_HZ / 1e6} MHz), uniform R ±1 %, C ±5 %`,
    `Rolloff (in process, incl. percentiles): first ${rolloffMs[0].toFixed(0)} ms, best of ${REPEATS} ${best(rolloffMs).toFixed(0)} ms`,
    `ngspice (-b, .control repeat/alter/ac):  best of ${REPEATS} ${best(ngspiceMs).toFixed(0)} ms (of which process start + parse ≈ ${best(startupMs).toFixed(0)} ms)`,
    `Ratio Rolloff/ngspice: ${ratio.toFixed(3)} (target ≤ 1.0) — ${ratio <= 1 ? 'met' : 'NOT met'}`,
  ];
  process.stdout.write(lines.join('\n') + '\n');
} finally {
  rmSync(dir, { recursive: true, force: true });
}
