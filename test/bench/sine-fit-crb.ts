/**
 * Monte Carlo efficiency of the three-parameter sine fit: variance of the
 * fitted amplitude and phase over many seeded noisy records, divided by the
 * Cramér–Rao bound (Kay 1993, Example 3.14, known-frequency form; recalled
 * from memory). Target ≤ 1.05. Run: npx tsx test/bench/sine-fit-crb.ts
 */
import { cramerRaoSinusoid, cramerRaoSinusoidExact, sineFit3 } from '../../app/signal';
import { noisySine, seededGaussian } from '../helpers/test-signals';

const trials = Number(process.env.TRIALS ?? 20000);
const record = { frequencyHz: 1234.5, sampleIntervalS: 1 / 250e3, sampleCount: 2000 }; // ≈ 9.9 cycles, not whole
const amplitudeV = 1;
const snrDb = 40;
const noiseStdV = amplitudeV / Math.SQRT2 / 10 ** (snrDb / 20); // SNR = (A²/2)/σ²
const truth = { amplitudeV, phaseRad: 0.9, offsetV: 0.05, noiseStdV };

const gaussian = seededGaussian(20261201);
let sumA = 0, sumA2 = 0, sumP = 0, sumP2 = 0, sumReportedA = 0, sumReportedP = 0;
const started = performance.now();
for (let k = 0; k < trials; k++) {
  const fit = sineFit3({ samplesV: noisySine({ ...record, ...truth }, gaussian), sampleIntervalS: record.sampleIntervalS, frequencyHz: record.frequencyHz });
  const dA = fit.amplitudeV - amplitudeV;
  const dP = fit.phaseRad - truth.phaseRad;
  sumA += dA; sumA2 += dA * dA; sumP += dP; sumP2 += dP * dP;
  sumReportedA += fit.amplitudeStdV; sumReportedP += fit.phaseStdRad;
}
const elapsedMs = performance.now() - started;
const varA = (sumA2 - (sumA * sumA) / trials) / (trials - 1);
const varP = (sumP2 - (sumP * sumP) / trials) / (trials - 1);
const asymptotic = cramerRaoSinusoid(amplitudeV, noiseStdV, record.sampleCount);
const exact = cramerRaoSinusoidExact({ ...truth, ...record });
const sampling = Math.sqrt(2 / (trials - 1)); // relative standard deviation of a sample variance

console.log(`sine-fit-crb: N = ${record.sampleCount} samples, ${(record.sampleCount * record.sampleIntervalS * record.frequencyHz).toFixed(2)} cycles, SNR ${snrDb} dB, ${trials} trials`);
console.log(`  amplitude: var/CRB = ${(varA / asymptotic.amplitudeVarianceV2).toFixed(4)} (asymptotic bound), ${(varA / exact.amplitudeVarianceV2).toFixed(4)} (exact bound for this record)   target ≤ 1.05`);
console.log(`  phase:     var/CRB = ${(varP / asymptotic.phaseVarianceRad2).toFixed(4)} (asymptotic bound), ${(varP / exact.phaseVarianceRad2).toFixed(4)} (exact bound for this record)   target ≤ 1.05`);
console.log(`  Monte Carlo sampling uncertainty of each ratio: ±${(100 * sampling).toFixed(1)} % (1σ)`);
console.log(`  bias: amplitude ${(sumA / trials).toExponential(2)} V (±${Math.sqrt(varA / trials).toExponential(1)}), phase ${(sumP / trials).toExponential(2)} rad (±${Math.sqrt(varP / trials).toExponential(1)})`);
console.log(`  reported/actual std: amplitude ${(sumReportedA / trials / Math.sqrt(varA)).toFixed(4)}, phase ${(sumReportedP / trials / Math.sqrt(varP)).toFixed(4)}`);
console.log(`  speed: ${(elapsedMs / trials * 1000).toFixed(1)} µs per ${record.sampleCount}-sample fit (including noise generation)`);
