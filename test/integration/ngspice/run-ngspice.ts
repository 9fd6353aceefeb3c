/**
 * Runs the reference simulator ngspice in batch mode on a netlist written by
 * toSpiceNetlist, in a temp dir, and reads back what its .control block wrote.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { toSpiceNetlist, type Design, type SpiceAnalysis } from '../../../app/circuit';

export interface NgspiceAc {
  frequencyHz: Float64Array;
  re: Float64Array;
  im: Float64Array;
}

export function withTempDir<T>(work: (dir: string) => T): T {
  const dir = mkdtempSync(join(tmpdir(), 'rolloff-ngspice-'));
  try {
    return work(dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export function runNgspice(netlistPath: string): string {
  try {
    return execFileSync('ngspice', ['-b', netlistPath], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], timeout: 60_000 });
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') {
      throw new Error('ngspice is not installed: these checks need the reference simulator. Install the Debian package ngspice (bash test/install-debian-packages.sh).');
    }
    throw error;
  }
}

/** Runs one analysis whose .control block writes `wrdata` columns; returns the numeric rows (header dropped). */
function wrdataRows(design: Design, analysis: SpiceAnalysis): number[][] {
  return withTempDir((dir) => {
    const outputFile = join(dir, 'wrdata.txt');
    const netlistPath = join(dir, 'circuit.cir');
    writeFileSync(netlistPath, toSpiceNetlist(design, analysis, { outputFile }));
    runNgspice(netlistPath);
    return readFileSync(outputFile, 'utf8').trim().split('\n').slice(1).map((line) => line.trim().split(/\s+/).map(Number));
  });
}

/** AC analysis in ngspice; columns from `wrdata` (frequency, real, imaginary of the output node). */
export function ngspiceAc(design: Design, analysis: Extract<SpiceAnalysis, { kind: 'ac' }>): NgspiceAc {
  const rows = wrdataRows(design, analysis);
  return {
    frequencyHz: Float64Array.from(rows, (r) => r[0]),
    re: Float64Array.from(rows, (r) => r[1]),
    im: Float64Array.from(rows, (r) => r[2]),
  };
}

/** DC operating points in ngspice, one per input level (a foreach/alter/op loop). */
export function ngspiceDc(design: Design, inputsV: Float64Array): Float64Array {
  return withTempDir((dir) => {
    const outputFile = join(dir, 'dc.txt');
    const netlistPath = join(dir, 'circuit.cir');
    writeFileSync(netlistPath, toSpiceNetlist(design, { kind: 'dc', inputsV }, { outputFile }));
    runNgspice(netlistPath);
    const values = readFileSync(outputFile, 'utf8')
      .split('\n')
      .filter((line) => line.includes('='))
      .map((line) => Number(line.split('=')[1]));
    return Float64Array.from(values);
  });
}

export interface NgspiceNoise {
  frequencyHz: Float64Array;
  /** ngspice's onoise_spectrum: total output noise density, V/√Hz. */
  outputVPerRtHz: Float64Array;
}

/** ngspice's .noise analysis at the design's output, referred to the input source. */
export function ngspiceNoise(design: Design, analysis: Extract<SpiceAnalysis, { kind: 'noise' }>): NgspiceNoise {
  const rows = wrdataRows(design, analysis);
  return { frequencyHz: Float64Array.from(rows, (r) => r[0]), outputVPerRtHz: Float64Array.from(rows, (r) => r[1]) };
}
