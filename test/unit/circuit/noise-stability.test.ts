/**
 * Noise and stability against closed-form results. Sources of the expected values:
 * - [JN] J. B. Johnson, "Thermal agitation of electricity in conductors", and
 *   H. Nyquist, "Thermal agitation of electric charge in conductors", Phys.
 *   Rev. 32 (1928): open-circuit noise density √(4kTR), white, so the RMS
 *   over a band B is √(4kTR·B). 1 kΩ at 300 K: 4.07 nV/√Hz.
 * - [MC] C. D. Motchenbacher, J. A. Connelly, "Low-Noise Electronic System
 *   Design" (Wiley, 1993), op-amp noise model (en in series with the input,
 *   in at each input, uncorrelated; 1/f corner e² = e_w²·(1 + fc/f)) and the
 *   inverting-stage sum of squares
 *   e_out² = en²·(1 + RF/RN)² + in²·RF² + 4kT·RF + 4kT·RN·(RF/RN)²
 *   + (in²·RP² + 4kT·RP)·(1 + RF/RN)² (recalled from memory; each term re-derived by superposition).
 * - [NG] Noise gain 1 + Z_F/Z_N shapes en to the output (also DEVELOPERS.md "Theory").
 * - [BODE] H. W. Bode, "Network Analysis and Feedback Amplifier Design" (1945):
 *   phase margin = 180° + ∠T at |T| = 1. For a follower (β = 1) on a two-pole
 *   op-amp T = A0/((1 + jf/f1)(1 + jf/f2)), |T| = 1 solves the quadratic
 *   (1 + u/f1²)(1 + u/f2²) = A0² in u = f², and PM = 180° − atan(f/f1) − atan(f/f2);
 *   the phase never reaches −180°, so the gain margin is infinite; the
 *   closed loop A0/((1 + s/ω1)(1 + s/ω2) + A0) peaks where d|D|²/dω² = 0.
 * - [CODATA] k = 1.380649e-23 J/K (exact, SI 2019).
 */
import { describe, expect, it } from 'vitest';
import {
  analyzeStability,
  bandNoise,
  loopGainColumns,
  BOLTZMANN_J_PER_K,
  makeDesignFromTemplate,
  parseDesign,
  solveNoise,
  stabilityWarnings,
  DesignError,
  type Design,
  type OpAmpModel,
} from '../../../app/circuit';
import { logGrid } from '../../../app/units';

const K = BOLTZMANN_J_PER_K;

function single(d: Design, frequencyHz: number) {
  const r = solveNoise(d, Float64Array.from([frequencyHz]));
  const byName = Object.fromEntries(r.sources.map((s, k) => [s.name, r.contributionsVPerRtHz[k][0]]));
  return { total: r.outputVPerRtHz[0], inputReferred: r.inputReferredVPerRtHz[0], byName };
}

/** One resistor from the (noiselessly driven) input to the output; 1 fF of probe capacitance grounds the output above 1 GHz. */
const lone = (ohms: number, temperatureC: number) =>
  parseDesign(
    {
      name: 'one resistor',
      input: 'in',
      output: 'out',
      temperatureC,
      parts: [
        { id: 'R1', type: 'resistor', nodes: ['in', 'out'], value: ohms },
        { id: 'CP', type: 'capacitor', nodes: ['out', '0'], value: 1e-15 },
      ],
    },
    'lone',
  );

describe('thermal noise of one resistor [JN]', () => {
  it('1 kΩ at 300 K: 4.07 nV/√Hz, white', () => {
    const r = solveNoise(lone(1000, 26.85), logGrid(1, 1e6, 2));
    for (const density of r.outputVPerRtHz) expect(density).toBeCloseTo(4.0704e-9, 12);
    expect(r.outputVPerRtHz[0]).toBeCloseTo(Math.sqrt(4 * K * 300 * 1000), 15);
    expect(r.sources.map((s) => s.name)).toEqual(['R1']);
  });

  it('scales as √(R·T): 100 kΩ at 85 °C', () => {
    expect(single(lone(1e5, 85), 1e3).total).toBeCloseTo(Math.sqrt(4 * K * 358.15 * 1e5), 15);
  });

  it('RMS over 10 Hz – 100 kHz is √(4kTR·B) to 1e-6', () => {
    const band = bandNoise(lone(1000, 26.85), 10, 1e5);
    const expected = Math.sqrt(4 * K * 300 * 1000 * (1e5 - 10));
    expect(Math.abs(band.outputRmsV / expected - 1)).toBeLessThan(1e-6);
  });
});

/** Inverting stage with a bias-compensation resistor RP on the non-inverting input. */
function invertingStage(model: Partial<OpAmpModel>, rf = 100e3, rn = 10e3, rp = 9.1e3): Design {
  return parseDesign(
    {
      name: 'inverting stage (invented test circuit)',
      input: 'in',
      output: 'out',
      temperatureC: 26.85,
      parts: [
        { id: 'RN', type: 'resistor', nodes: ['in', 'inv'], value: rn },
        { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: rf },
        { id: 'RP', type: 'resistor', nodes: ['p', '0'], value: rp },
        { id: 'U1', type: 'opamp', nodes: ['p', 'inv', 'out'], model: { openLoopGain: 1e7, gbw: 1e9, ...model } },
      ],
    },
    'inverting',
  );
}

describe('inverting stage at low frequency [MC]', () => {
  const en = 10e-9;
  const inA = 1e-12;
  const rf = 100e3;
  const rn = 10e3;
  const rp = 9.1e3;
  const fourKT = 4 * K * 300;
  const noiseGain = 1 + rf / rn;

  it('sum of squares of en, in (both pins), RF, RN and RP at 100 Hz, to 1e-5 relative', () => {
    const expected = Math.sqrt(
      (en * noiseGain) ** 2 + (inA * rf) ** 2 + fourKT * rf + fourKT * rn * (rf / rn) ** 2 + ((inA * rp) ** 2 + fourKT * rp) * noiseGain ** 2,
    );
    const got = single(invertingStage({ voltageNoiseVPerRtHz: en, currentNoiseAPerRtHz: inA }, rf, rn, rp), 100);
    expect(Math.abs(got.total / expected - 1)).toBeLessThan(1e-5);
    expect(got.byName.U1_en / (en * noiseGain)).toBeCloseTo(1, 5);
    expect(got.byName.U1_in_minus / (inA * rf)).toBeCloseTo(1, 5);
    expect(got.byName.U1_in_plus / (inA * rp * noiseGain)).toBeCloseTo(1, 5);
    expect(got.byName.RN / Math.sqrt(fourKT * rn * (rf / rn) ** 2)).toBeCloseTo(1, 5);
    // Input-referred: total ÷ |gain| with gain RF/RN.
    expect(got.inputReferred / (got.total / (rf / rn))).toBeCloseTo(1, 5);
  });

  it('1/f corners: at the corner frequency en² and in² double', () => {
    const white = single(invertingStage({ voltageNoiseVPerRtHz: en, currentNoiseAPerRtHz: inA }), 50);
    const pink = single(invertingStage({ voltageNoiseVPerRtHz: en, voltageNoiseCornerHz: 50, currentNoiseAPerRtHz: inA, currentNoiseCornerHz: 50 }), 50);
    expect(pink.byName.U1_en / white.byName.U1_en).toBeCloseTo(Math.SQRT2, 6);
    expect(pink.byName.U1_in_minus / white.byName.U1_in_minus).toBeCloseTo(Math.SQRT2, 6);
    expect(pink.byName.RF).toBe(white.byName.RF);
  });

  it('absent noise fields mean a noiseless op-amp: only the resistors are sources', () => {
    expect(solveNoise(invertingStage({}), Float64Array.from([1e3])).sources.map((s) => s.name)).toEqual(['RN', 'RF', 'RP']);
  });
});

describe('noise-gain shaping [NG]', () => {
  it('en reaches the output times |1 + Z_F/Z_N| with a capacitance across RN (ideal op-amp)', () => {
    const rf = 100e3;
    const cf = 10e-12;
    const rn = 10e3;
    const cn = 1e-9;
    const d = parseDesign(
      {
        name: 'inverting stage with input capacitance (invented test circuit)',
        input: 'in',
        output: 'out',
        parts: [
          { id: 'RN', type: 'resistor', nodes: ['in', 'inv'], value: rn },
          { id: 'CN', type: 'capacitor', nodes: ['inv', '0'], value: cn },
          { id: 'RF', type: 'resistor', nodes: ['inv', 'out'], value: rf },
          { id: 'CF', type: 'capacitor', nodes: ['inv', 'out'], value: cf },
          { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { ideal: true, voltageNoiseVPerRtHz: 5e-9 } },
        ],
      },
      'shaped',
    );
    const frequencies = logGrid(10, 1e7, 10);
    const r = solveNoise(d, frequencies);
    const en = r.contributionsVPerRtHz[r.sources.findIndex((s) => s.name === 'U1_en')];
    for (let i = 0; i < frequencies.length; i++) {
      const w = 2 * Math.PI * frequencies[i];
      // Y_N = 1/RN + jωCN, Z_F = 1/(1/RF + jωCF); noise gain = 1 + Z_F·Y_N.
      const yfRe = 1 / rf;
      const yfIm = w * cf;
      const ynRe = 1 / rn;
      const ynIm = w * cn;
      const d2 = yfRe * yfRe + yfIm * yfIm;
      const ratioRe = (ynRe * yfRe + ynIm * yfIm) / d2;
      const ratioIm = (ynIm * yfRe - ynRe * yfIm) / d2;
      expect(en[i] / (5e-9 * Math.hypot(1 + ratioRe, ratioIm))).toBeCloseTo(1, 9);
    }
    // The shaping is real: the noise gain rises from 11 towards 1 + CN/CF = 101.
    expect(en[0] / 5e-9).toBeCloseTo(11, 3);
    expect(en[frequencies.length - 1] / 5e-9).toBeGreaterThan(100);
  });
});

function follower(model: Partial<OpAmpModel>, load: { capacitanceF?: number } = {}): Design {
  const parts: object[] = [{ id: 'U1', type: 'opamp', nodes: ['in', 'out', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, ...model } }];
  if (load.capacitanceF) parts.push({ id: 'CL', type: 'capacitor', nodes: ['out', '0'], value: load.capacitanceF });
  else parts.push({ id: 'RL', type: 'resistor', nodes: ['out', '0'], value: 1e9 });
  return parseDesign({ name: 'follower (invented test circuit)', input: 'in', output: 'out', parts }, 'follower');
}

/** [BODE] closed form for T = A0/((1 + jf/f1)(1 + jf/f2)). */
function twoPoleClosedForm(a0: number, f1: number, f2: number) {
  const b = 1 / f1 ** 2 + 1 / f2 ** 2;
  const c = 1 - a0 * a0;
  const a = 1 / (f1 * f2) ** 2;
  const u = (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a);
  const crossoverHz = Math.sqrt(u);
  const phaseMarginDeg = 180 - (Math.atan(crossoverHz / f1) + Math.atan(crossoverHz / f2)) * (180 / Math.PI);
  // |D|² = (K − u/P)² + u·S² in u = ω², K = 1 + A0, P = ω1·ω2, S = 1/ω1 + 1/ω2.
  const w1 = 2 * Math.PI * f1;
  const w2 = 2 * Math.PI * f2;
  const K0 = 1 + a0;
  const P = w1 * w2;
  const S = 1 / w1 + 1 / w2;
  const uPeak = P * (K0 - (S * S * P) / 2);
  const d2 = (K0 - uPeak / P) ** 2 + uPeak * S * S;
  const peakingDb = uPeak > 0 ? 20 * Math.log10(a0 / Math.sqrt(d2)) : 0;
  return { crossoverHz, phaseMarginDeg, peakingDb };
}

/**
 * [BODE] T = A0/((1 + jf/f1)(1 + jf/f2)²): ∠T = −180° where
 * atan(f/f1) + 2·atan(f/f2) = 180° (solved by bisection), |T| there.
 */
function threePolePhaseCrossover(a0: number, f1: number, f2: number) {
  let low = f2 / 100;
  let high = f2 * 100;
  for (let k = 0; k < 200; k++) {
    const mid = Math.sqrt(low * high);
    if (Math.atan(mid / f1) + 2 * Math.atan(mid / f2) < Math.PI) low = mid;
    else high = mid;
  }
  const frequencyHz = Math.sqrt(low * high);
  return { frequencyHz, loopGain: a0 / (Math.sqrt(1 + (frequencyHz / f1) ** 2) * (1 + (frequencyHz / f2) ** 2)) };
}

describe('stability of a follower [BODE]', () => {
  it('two-pole op-amp: phase margin, crossover and peaking in closed form; infinite gain margin', () => {
    const a0 = 1e5;
    const gbw = 1e6;
    const f2 = 1.2e6;
    const [s] = analyzeStability(follower({ openLoopGain: a0, gbw, secondPoleHz: f2 }));
    const expected = twoPoleClosedForm(a0, gbw / a0, f2);
    expect(s.crossoverHz! / expected.crossoverHz).toBeCloseTo(1, 9);
    expect(s.phaseMarginDeg!).toBeCloseTo(expected.phaseMarginDeg, 6);
    expect(s.peakingDb).toBeCloseTo(expected.peakingDb, 6);
    expect(expected.phaseMarginDeg).toBeGreaterThan(40);
    expect(expected.phaseMarginDeg).toBeLessThan(60);
    expect(s.gainMarginDb).toBe(Infinity);
  });

  it('loop gain columns: |T| and continuous ∠T of the two-pole follower in closed form', () => {
    const frequencies = logGrid(1, 1e8, 5);
    const [columns] = loopGainColumns(follower({ openLoopGain: 1e5, gbw: 1e6, secondPoleHz: 2e6 }), frequencies);
    expect(columns.id).toBe('U1');
    for (let i = 0; i < frequencies.length; i++) {
      const x1 = frequencies[i] / 10;
      const x2 = frequencies[i] / 2e6;
      expect(columns.loopGainDb[i]).toBeCloseTo(20 * Math.log10(1e5 / Math.sqrt((1 + x1 * x1) * (1 + x2 * x2))), 9);
      // Continuous phase: tends to −180° above both poles, never wraps to +180°.
      expect(columns.loopPhaseDeg[i]).toBeCloseTo(-(Math.atan(x1) + Math.atan(x2)) * (180 / Math.PI), 9);
    }
  });

  it('output resistance into a capacitive load is the second pole: 100 Ω, 10 nF at 159 kHz', () => {
    const ro = 100;
    const cl = 10e-9;
    const [s] = analyzeStability(follower({ outputResistanceOhm: ro }, { capacitanceF: cl }));
    const expected = twoPoleClosedForm(1e5, 10, 1 / (2 * Math.PI * ro * cl));
    expect(s.phaseMarginDeg!).toBeCloseTo(expected.phaseMarginDeg, 6);
    expect(s.peakingDb).toBeCloseTo(expected.peakingDb, 5);
    // Without the output resistance the same load changes nothing (single pole: 90° margin).
    const [stiff] = analyzeStability(follower({}, { capacitanceF: cl }));
    expect(stiff.phaseMarginDeg!).toBeCloseTo(90, 2);
  });

  it('three poles reach −180°: gain margin = −|T| there (poles at 10 Hz, 1 MHz, 1 MHz, A0 = 1e5)', () => {
    // A second and third pole both at 1 MHz are made with secondPoleHz and Ro·CL at 1 MHz.
    const ro = 100;
    const cl = 1 / (2 * Math.PI * ro * 1e6);
    const [s] = analyzeStability(follower({ secondPoleHz: 1e6, outputResistanceOhm: ro }, { capacitanceF: cl }));
    const { frequencyHz: f, loopGain: t } = threePolePhaseCrossover(1e5, 10, 1e6);
    expect(s.phaseCrossoverHz! / f).toBeCloseTo(1, 6);
    expect(s.gainMarginDb).toBeCloseTo(-20 * Math.log10(t), 5);
    expect(s.phaseMarginDeg!).toBeGreaterThan(0);
    expect(s.phaseMarginDeg!).toBeLessThan(45);
    expect(stabilityWarnings([s])[0].message).toMatch(/will ring/);
  });

  it('poles at 10 Hz, 100 kHz and 100 kHz: negative margins, flagged as oscillating', () => {
    const ro = 100;
    const [s] = analyzeStability(follower({ secondPoleHz: 1e5, outputResistanceOhm: ro }, { capacitanceF: 1 / (2 * Math.PI * ro * 1e5) }));
    // Near 100 kHz |T| ≈ 1e5/(1e4·2) = 5: gain margin about −14 dB.
    const { frequencyHz, loopGain } = threePolePhaseCrossover(1e5, 10, 1e5);
    expect(s.phaseCrossoverHz! / frequencyHz).toBeCloseTo(1, 6);
    expect(s.gainMarginDb).toBeCloseTo(-20 * Math.log10(loopGain), 5);
    expect(s.phaseMarginDeg!).toBeLessThan(0);
    expect(stabilityWarnings([s])[0].message).toMatch(/will oscillate/);
  });
});

describe('phase-margin warning', () => {
  it('flags a margin below 45° by default, or below a user limit, and names the op-amp', () => {
    const ringing = analyzeStability(follower({ secondPoleHz: 0.3e6 }));
    const [warning] = stabilityWarnings(ringing);
    expect(warning.kind).toBe('low-phase-margin');
    expect(warning.opAmpId).toBe('U1');
    expect(warning.phaseMarginDeg).toBeLessThan(45);
    expect(warning.message).toMatch(/^U1: phase margin \d+\.\d° is below 45°/);
    const calm = analyzeStability(follower({ secondPoleHz: 5e6 }));
    expect(stabilityWarnings(calm)).toEqual([]);
    expect(stabilityWarnings(calm, 85)).toHaveLength(1);
  });

  it('ideal op-amps have no loop to judge', () => {
    expect(analyzeStability(parseDesign(makeDesignFromTemplate('inverting-lowpass'), 'x')).length).toBe(1);
    expect(analyzeStability(follower({ ideal: true }))).toEqual([]);
  });
});

describe('noise analysis input', () => {
  it('refuses a design with a diode, saying why', () => {
    const log = parseDesign(makeDesignFromTemplate('log-stage'), 'log');
    expect(() => solveNoise(log, Float64Array.from([1e3]))).toThrow(DesignError);
    expect(() => solveNoise(log, Float64Array.from([1e3]))).toThrow(/operating point/);
  });

  it('reads the noise fields in engineering notation and refuses negative ones by name', () => {
    const d = follower({ voltageNoiseVPerRtHz: '4n', currentNoiseAPerRtHz: '2f', voltageNoiseCornerHz: '1k', outputResistanceOhm: '75' } as unknown as Partial<OpAmpModel>);
    const model = (d.parts[0] as { model: OpAmpModel }).model;
    expect(model.voltageNoiseVPerRtHz).toBeCloseTo(4e-9, 20);
    expect(model.currentNoiseAPerRtHz).toBeCloseTo(2e-15, 25);
    expect(model.voltageNoiseCornerHz).toBe(1000);
    expect(model.outputResistanceOhm).toBe(75);
    expect(() => follower({ currentNoiseCornerHz: -1 })).toThrow(/U1\.model\.currentNoiseCornerHz.*negative/);
  });
});
