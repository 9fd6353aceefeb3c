/**
 * The one table of user-facing names and units. The CLI, the window and the
 * records take a figure's name, a column's name, a point flag's words and a
 * setting's name from here, so a new figure is named once and a test
 * (test/unit/contract/vocabulary.test.ts) can find a name spelled two ways.
 *
 * Minus signs: text for people (CLI tables, the window, HTML/PDF/text records)
 * writes the true minus "−" (U+2212); machine formats (CSV, JSON, command
 * options) write ASCII "-" so every reader parses them.
 */
import { PointFlag, type NoiseWindow } from './contract';

/** Figures of a run or a theory, by the key they have in RunFigures / the theory summary. */
export const FIGURE_NAMES = {
  passbandGainDb: 'Pass-band gain',
  minus3dbHz: '−3 dB frequencies',
  rolloffDbPerDecade: 'Roll-off',
  gainLimitHz: 'Gain-limit point',
  gbwEstimateHz: 'GBW estimate',
  maxDeviationDb: 'Largest deviation from theory',
  diodeIdealityN: 'Diode ideality factor n',
  diodeSaturationCurrentA: 'Saturation current IS',
  diodeSeriesResistanceOhm: 'Series resistance RS',
  /** Computed from the design (Design view, theory). */
  phaseMarginDeg: 'Phase margin',
  /** Measured: from the closed-loop peaking, through a second-order loop. */
  phaseMarginEstimateDeg: 'Phase margin estimate',
  gainMarginDb: 'Gain margin',
  /** Measured over the ideal gain, or computed. */
  closedLoopPeakingDb: 'Closed-loop peaking',
  theoryWarning: 'Theory warning',
  noiseMeasuredRmsV: 'Output noise over the band (measured)',
  noiseComputedRmsV: 'Output noise over the band (computed)',
  noiseDensity: 'Output noise density',
  noiseShareWithin95: 'Bins whose 95 % interval holds the computed density',
  noiseMeanDeviationDb: 'Mean deviation from the computed density',
} as const;

/** How the phase margin estimate is reached, said beside its value. */
export const PHASE_MARGIN_ESTIMATE_BASIS = 'from the closed-loop peaking, second-order loop';

/** A measured figure's computed value beside it, on every surface: "(theory 1.59 kHz)". */
export function theoryAside(text: string): string {
  return `(theory ${text})`;
}

/** The two kinds of bench a run is measured on, as every surface names them. */
export const BENCH_WORDS = { simulated: 'simulated bench', real: 'real instruments' } as const;

export type FigureKey = keyof typeof FIGURE_NAMES;

/** Names people might have used for a figure before this table; the vocabulary test refuses them. */
export const RETIRED_FIGURE_NAMES: Record<string, FigureKey> = {
  'Emission coefficient n': 'diodeIdealityN',
  '−3 dB points': 'minus3dbHz',
  'Max deviation': 'maxDeviationDb',
  'Gain limit (': 'gainLimitHz',
  'log fit ': 'diodeIdealityN',
  'current I_S': 'diodeSaturationCurrentA',
  'resistance R_S': 'diodeSeriesResistanceOhm',
  'Phase margin from peaking': 'phaseMarginEstimateDeg',
  'Phase margin estimated': 'phaseMarginEstimateDeg',
  'measured over ideal gain': 'closedLoopPeakingDb',
  'computed theory': 'theoryWarning',
};

/** Names the maximum stimulus had on some surfaces before this table; the vocabulary test refuses them. */
export const RETIRED_SETTING_NAMES = ['Safety limit', 'maximum stimulus,', 'or target output (Vpp', 'Band high', 'Band low', 'emission coefficient', 'maximum stimulus amplitude', 'Maximum stimulus amplitude', 'bench maximum', 'Refinement near corners', 'Refine −3 dB', 'physical instruments', 'simulated (simulated', 'SIMULATED: simulated'];

/** A run's kind as people read it (CLI tables, the window, records); commands and files keep ac/dc. */
export const RUN_KIND_NAMES = { ac: 'AC', dc: 'DC', noise: 'noise' } as const;

/** Point flags as words (records, CLI tables, the window). */
export const FLAG_WORDS: Record<keyof typeof PointFlag, string> = {
  distorted: 'distorted',
  overrange: 'overrange',
  notANumber: 'not a number',
  outsideToleranceBand: 'outside tolerance band',
  retried: 'retried',
  refinement: 'refinement point',
  pastGainLimit: 'past gain limit',
};

/** Flag bits → words, e.g. 9 → "distorted; outside tolerance band". Unknown bits are named by value. */
export function flagWords(flags: number, separator = '; '): string {
  const words: string[] = [];
  let known = 0;
  for (const [key, bit] of Object.entries(PointFlag) as Array<[keyof typeof PointFlag, number]>) {
    known |= bit;
    if (flags & bit) words.push(FLAG_WORDS[key]);
  }
  const unknown = flags & ~known;
  if (unknown) words.push(`unknown flags ${unknown}`);
  return words.join(separator);
}

/**
 * A run's points as words, for every surface (CLI, Sweep view, records):
 * "41 planned + 2 refinement", or "20 of 41 planned" for a run that stopped
 * early. Refinement points come after the plan, so the count of points can
 * pass the planned count; they are told apart by their flag, not by position.
 */
export function pointCountText(plannedCount: number, pointFlags: ArrayLike<number>): string {
  let refinement = 0;
  for (let i = 0; i < pointFlags.length; i++) if ((pointFlags[i] & PointFlag.refinement) !== 0) refinement++;
  return pointCountsText(plannedCount, pointFlags.length - refinement, refinement);
}

/**
 * The same words from a run summary's two counts (lists of runs carry no
 * flags): refinement points are measured only after every planned step, so
 * points beyond the planned count are refinement points.
 */
export function summaryPointCountText(plannedCount: number, pointCount: number): string {
  return pointCountsText(plannedCount, Math.min(pointCount, plannedCount), Math.max(0, pointCount - plannedCount));
}

function pointCountsText(plannedCount: number, plannedMeasured: number, refinement: number): string {
  const planned = plannedMeasured === plannedCount ? `${plannedCount} planned` : `${plannedMeasured} of ${plannedCount} planned`;
  return refinement > 0 ? `${planned} + ${refinement} refinement` : planned;
}

/** Settings, with the one name each surface uses for them. */
export const SETTINGS = {
  maxStimulus: {
    /** Window labels and record headings. */
    label: 'Maximum stimulus',
    unit: 'Vpp',
    cliOption: 'max-stimulus',
    /** Its name before this table: still accepted on the command line, never shown in help. */
    cliAliases: ['max-amplitude'],
    /** Field of the bench in the contract and the records. */
    field: 'maxStimulusVpp',
    /** Said wherever the limit is set: how a DC level is counted against it. */
    explanation: 'the generator is never driven above this peak-to-peak amplitude; a DC level V counts as 2·|V| against it',
  },
  /** Automatic amplitude (the default): chosen per point from theory, as large as keeps the stage linear. */
  automaticAmplitude: {
    label: 'Automatic amplitude',
    explanation: 'chosen per point from theory: as large as keeps the output inside the rails and the slew limit',
  },
  fixedAmplitude: {
    label: 'Fixed amplitude',
    unit: 'Vpp',
    cliOption: 'amplitude',
    explanation: 'the same stimulus at every point, instead of the automatic amplitude',
  },
  targetOutput: {
    label: 'Target output',
    unit: 'Vpp',
    cliOption: 'target-output',
    explanation: 'automatic amplitude aiming for this output, never above what stays linear (empty: as large as stays linear)',
  },
  linearPoints: {
    label: 'Points (linear)',
    cliOption: 'points',
    explanation: 'linear spacing: how many points from start to end',
  },
  refine: {
    label: 'Refinement near the −3 dB and gain-limit points',
    /** The CLI option turns it off; the default is on. */
    cliOption: 'no-refine',
    explanation: 'extra points near the −3 dB and gain-limit points, measured after the planned ones',
  },
  pointsPerDecade: {
    label: 'Points per decade (log)',
    cliOption: 'per-decade',
    explanation: 'log spacing: points per decade',
  },
} as const;

/**
 * Op-amp and diode model parameters as people read and type them: the design
 * file keeps SI units (app/circuit/types.ts); a parameter with `perSi` is shown
 * and entered in the trade's unit instead (slew rate in V/µs: 0.5 V/µs is
 * 500 000 V/s in the file).
 */
export interface ModelParameterName {
  /** Key in the design file's model object. */
  key: string;
  label: string;
  /** Short symbol for tables, as on a data sheet. */
  symbol: string;
  /** The unit people read, already prefixed where perSi is set. */
  unit: string;
  /** Shown value = design-file value × perSi. */
  perSi?: number;
}

export const OPAMP_MODEL_PARAMETERS: ModelParameterName[] = [
  { key: 'openLoopGain', label: 'Open-loop gain A0', symbol: 'A0', unit: 'V/V' },
  { key: 'gbw', label: 'Gain-bandwidth', symbol: 'GBW', unit: 'Hz' },
  { key: 'slewRate', label: 'Slew rate', symbol: 'SR', unit: 'V/µs', perSi: 1e-6 },
  { key: 'secondPoleHz', label: 'Second pole', symbol: '2nd pole', unit: 'Hz' },
  { key: 'inputOffsetV', label: 'Input offset voltage', symbol: 'Vos', unit: 'V' },
  { key: 'inputBiasA', label: 'Input bias current', symbol: 'Ib', unit: 'A' },
  { key: 'voltageNoiseVPerRtHz', label: 'Input voltage noise', symbol: 'en', unit: 'V/√Hz' },
  { key: 'voltageNoiseCornerHz', label: 'Voltage noise 1/f corner', symbol: 'en 1/f corner', unit: 'Hz' },
  { key: 'currentNoiseAPerRtHz', label: 'Input current noise', symbol: 'in', unit: 'A/√Hz' },
  { key: 'currentNoiseCornerHz', label: 'Current noise 1/f corner', symbol: 'in 1/f corner', unit: 'Hz' },
  { key: 'outputResistanceOhm', label: 'Output resistance', symbol: 'Ro', unit: 'Ω' },
];

export const DIODE_MODEL_PARAMETERS: ModelParameterName[] = [
  { key: 'is', label: FIGURE_NAMES.diodeSaturationCurrentA, symbol: 'IS', unit: 'A' },
  { key: 'n', label: FIGURE_NAMES.diodeIdealityN, symbol: 'n', unit: '' },
  { key: 'rs', label: FIGURE_NAMES.diodeSeriesResistanceOhm, symbol: 'RS', unit: 'Ω' },
];

/** How the output was read: the scope gives its peak, the meter its RMS, a DC run its DC level. */
export type OutputReading = 'peak' | 'rms' | 'dc';

export function outputReadingOf(kind: 'ac' | 'dc', measurement: 'scope' | 'meter'): OutputReading {
  if (kind === 'dc') return 'dc';
  return measurement === 'meter' ? 'rms' : 'peak';
}

/** CSV column for the output voltage, naming its unit. */
export const OUTPUT_COLUMN: Record<OutputReading, string> = { peak: 'output_v_peak', rms: 'output_v_rms', dc: 'output_v_dc' };

/** The same column in a JSON record's points (app/record/record.schema.json). */
export const OUTPUT_KEY = { peak: 'outputVPeak', rms: 'outputVRms', dc: 'outputVDc' } as const satisfies Record<OutputReading, string>;

/** CSV columns of a point, each naming what it holds and its unit. */
export const POINT_COLUMNS = {
  runId: 'run_id',
  buildLabel: 'build_label',
  step: 'step',
  frequencyHz: 'frequency_hz',
  inputV: 'input_v_dc',
  /** AC and DC runs in one table. */
  stimulusMixed: 'stimulus_hz_or_v_dc',
  /** The generator's amplitude setting, not a measured input. */
  stimulusSettingVpp: 'stimulus_setting_vpp',
  gainDb: 'gain_db',
  gainUncertaintyDb: 'gain_uncertainty_db',
  phaseDeg: 'phase_deg',
  phaseUncertaintyDeg: 'phase_uncertainty_deg',
  flags: 'flags',
  flagWords: 'flag_names',
  measuredAt: 'measured_at',
  deltaFromReferenceDb: 'delta_from_reference_db',
} as const;

/** CSV and JSON columns of a noise run's density (the first two as rolloff theory --noise writes them). */
export const NOISE_COLUMNS = {
  frequencyHz: 'frequency_hz',
  densityVPerRtHz: 'noise_v_per_rthz',
  uncertaintyVPerRtHz: 'noise_uncertainty_v_per_rthz',
  low95VPerRtHz: 'noise_low95_v_per_rthz',
  high95VPerRtHz: 'noise_high95_v_per_rthz',
  computedVPerRtHz: 'computed_noise_v_per_rthz',
} as const;

/** Welch windows by the names people know them by. */
export const WINDOW_NAMES: Record<NoiseWindow, string> = { hann: 'Hann', rectangular: 'rectangular' };
