/**
 * The circuit's own noise at the simulated output: the theory engine's output
 * density (solveNoise on the circuit as the generator sees it, its source
 * resistance included) turned into a time record by shapedNoiseRecord.
 *
 * Samples on a uniform grid (the scope's record) are read from one block of
 * BLOCK_SAMPLES samples at that interval; the block is periodic, so a new
 * independent block starts whenever a request leaves the present one (records
 * far apart in time are independent, as they are on a real bench). Requests
 * at other intervals get a block of their own. The density is solved on a log
 * grid and interpolated log–log between its points (it is smooth: poles and
 * 1/f corners), flat below the grid.
 */
import { solveNoise, type Design } from '../circuit';
import type { SeededRandom } from '../numeric';
import { shapedNoiseRecord } from '../signal';
import { logGrid } from '../units';

/** 2^17 samples: ~10 ms for fft.js here, and 8 scope records of 16 k points per block. */
const BLOCK_SAMPLES = 1 << 17;
const DENSITY_POINTS_PER_DECADE = 40;
/** The meter samples at random times; it sees the noise on this grid (a 500 kHz band, held between samples). */
export const METER_NOISE_INTERVAL_S = 1e-6;

interface Block {
  intervalS: number;
  startS: number;
  samples: Float64Array;
}

export class CircuitNoise {
  private readonly blocks = new Map<number, Block>();

  constructor(
    private readonly design: Design,
    private readonly random: SeededRandom,
  ) {
    // Fails here, with the theory engine's message, for a design it cannot compute (a diode stage).
    solveNoise(design, Float64Array.of(1000));
  }

  /** One-sided output density at `frequencyHz`, V/√Hz, from the theory engine. */
  densityAt(frequencyHz: number): number {
    return solveNoise(this.design, Float64Array.of(frequencyHz)).outputVPerRtHz[0];
  }

  /** `count` noise samples from `startS` at `intervalS`, volts. */
  samples(startS: number, intervalS: number, count: number): Float64Array {
    const out = new Float64Array(count);
    for (let i = 0; i < count; i++) out[i] = this.at(startS + i * intervalS, intervalS);
    return out;
  }

  /** The noise at bench time `timeS` on the grid of `intervalS` (nearest sample). */
  at(timeS: number, intervalS: number): number {
    let block = this.blocks.get(intervalS);
    let index = block ? Math.round((timeS - block.startS) / intervalS) : -1;
    if (!block || index < 0 || index >= BLOCK_SAMPLES) {
      block = this.newBlock(timeS, intervalS);
      index = 0;
    }
    return block.samples[index];
  }

  private newBlock(startS: number, intervalS: number): Block {
    const sampleRateHz = 1 / intervalS;
    const frequenciesHz = logGrid(sampleRateHz / BLOCK_SAMPLES, sampleRateHz / 2, DENSITY_POINTS_PER_DECADE);
    const densities = solveNoise(this.design, frequenciesHz).outputVPerRtHz;
    const logF = Array.from(frequenciesHz, Math.log);
    const logD = Array.from(densities, (d) => Math.log(Math.max(d, 1e-30)));
    let j = 0;
    const samples = shapedNoiseRecord({
      length: BLOCK_SAMPLES,
      sampleRateHz,
      gaussian: () => this.random.nextGaussian(),
      densityVPerRtHz: (frequencyHz) => {
        // Frequencies arrive in increasing order: walk the grid once.
        const x = Math.log(frequencyHz);
        if (x <= logF[0]) return densities[0];
        while (j < logF.length - 2 && logF[j + 1] < x) j++;
        const t = Math.min(1, (x - logF[j]) / (logF[j + 1] - logF[j]));
        return Math.exp(logD[j] + (logD[j + 1] - logD[j]) * t);
      },
    });
    const block = { intervalS, startS, samples };
    if (this.blocks.size > 4) this.blocks.clear();
    this.blocks.set(intervalS, block);
    return block;
  }
}
