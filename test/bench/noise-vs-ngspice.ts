/**
 * Benchmark: output noise density of the unity-gain second-order low-pass
 * (Sallen–Key template, op-amp with invented en 8 nV/√Hz, 200 Hz corner, in
 * 0.6 pA/√Hz, 2 kHz corner), 201 log points 10 Hz – 1 MHz, by Rolloff in
 * process (solveNoise: one adjoint MNA solve per point) and by ngspice's
 * .noise on the same netlist (the noise sources built as in
 * app/circuit/spice-netlist.ts), side by side in one run. Also checks that
 * both give the same density (0.1 dB), so the times compare like with like.
 *
 * Run: npx tsx test/bench/noise-vs-ngspice.ts
 * Times are wall-clock, best of REPEATS; ngspice's includes its process start
 * and netlist parsing (shown separately). Target: ratio ≤ 0.2.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { makeDesignFromTemplate, parseDesign, solveNoise, toSpiceNetlist, type Design, type DesignFile } from '../../app/circuit';
import { logGrid } from '../../app/units';

const FROM_HZ = 10;
const TO_HZ = 1e6;
const PER_DECADE = 40;
const REPEATS = 5;
const TARGET_RATIO = 0.2;

const file = makeDesignFromTemplate('sallen-key-lowpass-unity') as DesignFile & { parts: Array<{ type: string; model?: object }> };
for (const part of file.parts) {
  if (part.type === 'opamp') part.model = { ...part.model, voltageNoiseVPerRtHz: 8e-9, voltageNoiseCornerHz: 200, currentNoiseAPerRtHz: 0.6e-12, currentNoiseCornerHz: 2000 };
}
const design: Design = parseDesign(file, 'sallen-key-lowpass-unity');
const frequencies = logGrid(FROM_HZ, TO_HZ, PER_DECADE);

function timeRolloff(): { ms: number; density: Float64Array } {
  const start = performance.now();
  const noise = solveNoise(design, frequencies);
  return { ms: performance.now() - start, density: noise.outputVPerRtHz };
}

function timeNgspice(deckPath: string): number {
  const start = performance.now();
  const result = spawnSync('ngspice', ['-b', deckPath], { encoding: 'utf8' });
  const elapsed = performance.now() - start;
  if (result.error) throw new Error(`ngspice did not start (${result.error.message}): install the Debian package ngspice.`);
  if (result.status !== 0) throw new Error(`ngspice failed (${result.status}): ${result.stderr}`);
  return elapsed;
}

const dir = mkdtempSync(join(tmpdir(), 'rolloff-bench-noise-'));
try {
  const outputFile = join(dir, 'noise.txt');
  const noiseDeck = join(dir, 'noise.cir');
  const emptyDeck = join(dir, 'startup.cir');
  writeFileSync(noiseDeck, toSpiceNetlist(design, { kind: 'noise', fromHz: FROM_HZ, toHz: TO_HZ, pointsPerDecade: PER_DECADE }, { outputFile }));
  // Same netlist, an operating point only: process start + parse.
  writeFileSync(emptyDeck, toSpiceNetlist(design, { kind: 'op' }).replace(/^\.op$/m, '.control\nquit\n.endc'));

  const rolloffMs: number[] = [];
  const ngspiceMs: number[] = [];
  const startupMs: number[] = [];
  let density: Float64Array = new Float64Array(0);
  for (let i = 0; i < REPEATS; i++) {
    const run = timeRolloff();
    rolloffMs.push(run.ms);
    density = run.density;
    ngspiceMs.push(timeNgspice(noiseDeck));
    startupMs.push(timeNgspice(emptyDeck));
  }
  const rows = readFileSync(outputFile, 'utf8').trim().split('\n').slice(1).map((line) => line.trim().split(/\s+/).map(Number));
  if (rows.length !== frequencies.length) throw new Error(`ngspice gave ${rows.length} points, expected ${frequencies.length}`);
  const worstDb = Math.max(...rows.map((row, i) => Math.abs(20 * Math.log10(density[i] / row[1]))));
  if (!(worstDb < 0.1)) throw new Error(`densities differ by ${worstDb.toFixed(3)} dB: the comparison is not like with like`);

  const best = (values: number[]) => Math.min(...values);
  const ratio = best(rolloffMs) / best(ngspiceMs);
  const lines = [
    `Noise analysis: ${design.name}, ${frequencies.length} log points (${FROM_HZ} Hz – ${TO_HZ / 1e6} MHz), resistors + op-amp en/in with 1/f corners`,
    `Agreement: worst difference ${worstDb.toExponential(2)} dB`,
    `Rolloff (in process, solveNoise): first ${rolloffMs[0].toFixed(2)} ms, best of ${REPEATS} ${best(rolloffMs).toFixed(2)} ms`,
    `ngspice (-b, .noise):              best of ${REPEATS} ${best(ngspiceMs).toFixed(1)} ms (start-up and parse alone, the same netlist with no analysis: best ${best(startupMs).toFixed(1)} ms — the .noise analysis is within its run-to-run spread)`,
    `Ratio Rolloff/ngspice: ${ratio.toFixed(4)} (target ≤ ${TARGET_RATIO}) — ${ratio <= TARGET_RATIO ? 'met' : 'NOT met'}`,
    // ngspice's analysis itself is within the start-up's run-to-run spread, so no ratio against "ngspice less start-up" is printed.
    `For scale: Rolloff's first (cold, before JIT) call / ngspice best: ${(rolloffMs[0] / best(ngspiceMs)).toFixed(3)}`,
  ];
  process.stdout.write(lines.join('\n') + '\n');
} finally {
  rmSync(dir, { recursive: true, force: true });
}
