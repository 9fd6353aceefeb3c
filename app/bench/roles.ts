/**
 * What the sweep runner asks of each instrument role. These are the only
 * instrument calls a sweep makes; profiles turn them into SCPI commands.
 *
 * Amplitude convention (documented once, here): `amplitudeVpp` is the
 * peak-to-peak voltage the generator is told to produce *into the load it has
 * been set for* — what its display shows. With load 'high-z' that is the
 * open-circuit voltage; with load '50-ohm' it is the voltage across a 50 Ω
 * load, so the open-circuit (EMF) voltage is twice that. A circuit whose input
 * impedance is not 50 Ω sees neither exactly: V_in = V_emf · Z_in / (Z_in + R_source).
 * See app/bench/stimulus.ts for the conversions.
 */
import type { InstrumentIdentity } from '../contract/contract';
import type { Reading } from '../scpi/reading';
import type { ScpiSession } from '../scpi/session';

export type LoadSetting = 'high-z' | '50-ohm';

export interface SineSetting {
  frequencyHz: number;
  /** Peak-to-peak into the set load (see file comment). */
  amplitudeVpp: number;
  offsetV: number;
}

export interface GeneratorLimits {
  minFrequencyHz: number;
  maxFrequencyHz: number;
  /** The instrument's own ceiling (profile); the user's ceiling is maxStimulusVpp. */
  maxAmplitudeVpp: number;
  /** The smallest sine amplitude the instrument sets (profile; 0 when it gives none). Also the amplitude of the safe state. */
  minAmplitudeVpp: number;
}

/** How a quiet generator was confirmed: its own report of the output state, or only its acceptance of the command (the profile has no readOutput). */
export type OutputOffCheck = 'read back' | 'commanded';

export interface GeneratorControl {
  readonly limits: GeneratorLimits;
  /** Resistance behind the output terminal (profile), ohms: what the stage input sees from a connected generator, on or off. */
  readonly sourceImpedanceOhm: number;
  /** The user's ceiling, open-circuit peak-to-peak volts including |offset| as peak. */
  readonly maxStimulusVpp: number;
  /** Throws StimulusLimitError before anything is sent if the setting exceeds maxStimulusVpp. */
  configureSine(setting: SineSetting): Promise<void>;
  /** DC output at `levelV` (into the set load). Same limit check, |level| as peak. */
  configureDc(levelV: number): Promise<void>;
  setOutput(on: boolean): Promise<void>;
  /**
   * The quiet state a noise measurement needs: output off, then the smallest
   * amplitude and no offset, each confirmed and checked against maxStimulusVpp
   * like any setting; then, where the profile can read the output state back,
   * the instrument's own report (GeneratorOutputOnError if it says on).
   */
  holdOff(): Promise<OutputOffCheck>;
  /** Re-checks the present setting: switching to '50-ohm' doubles the open-circuit voltage. */
  setLoad(load: LoadSetting): Promise<void>;
  /** Reads the frequency back from the instrument (for checks and logs). */
  readFrequencyHz(): Promise<Reading>;
  /**
   * When the instrument's confirmation of the latest change to its output arrived (performance.now()
   * ms), if known: settling can be counted from it rather than from when the call returned.
   */
  readonly confirmedAtMs?: number;
}

export interface MeterControl {
  /** AC RMS volts (true RMS of the AC part). */
  readAcRmsV(): Promise<Reading>;
  readDcV(): Promise<Reading>;
  /** Full-scale range in volts, or 'auto'. Applies to the function read next. */
  setRange(rangeV: number | 'auto'): Promise<void>;
  /** Integration (aperture) time in seconds. */
  setIntegration(integrationS: number): Promise<void>;
}

export type ScopeChannel = 1 | 2;

export interface Waveform {
  channel: ScopeChannel;
  sampleIntervalS: number;
  samplesV: Float64Array;
  /** Some samples sat at the converter's limits: the vertical scale is too small. */
  clipped: boolean;
}

export interface ScopeControl {
  /** Vertical scale per channel, volts per division. */
  setVerticalScale(channel: ScopeChannel, voltsPerDiv: number): Promise<void>;
  /** Turns both channels on with the given scales (convenience for a sweep start). */
  setupChannels(voltsPerDiv: { 1: number; 2: number }): Promise<void>;
  /** Horizontal extent of one record in seconds (the profile knows the division count). */
  setTimebase(secondsPerRecord: number): Promise<void>;
  /** Present only when the profile has recordPoints: samples per record (the sample interval is then record time ÷ points). */
  setRecordPoints?(points: number): Promise<void>;
  readonly divisions: number;
  /** Vertical divisions on screen: the range either side of 0 V is volts per division × verticalDivisions ÷ 2. */
  readonly verticalDivisions: number;
  /**
   * Captures one record of both channels at once (same time base, so the phase
   * between them is meaningful) and waits until it is complete.
   */
  acquire(): Promise<void>;
  /** A channel of the last acquire(). */
  fetchWaveform(channel: ScopeChannel): Promise<Waveform>;
  /** Both channels of the last acquire(), in one round trip when the profile allows it. */
  fetchBoth(): Promise<{ 1: Waveform; 2: Waveform }>;
  /** Present only when the profile has the measurement. Peak-to-peak volts. */
  measureAmplitudeVpp?(channel: ScopeChannel): Promise<Reading>;
  /** Present only when the profile has it. Phase of channel 2 relative to channel 1, degrees. */
  measurePhaseDeg?(): Promise<Reading>;
}

export interface RoleControls {
  generator: GeneratorControl;
  meter: MeterControl;
  scope: ScopeControl;
}

export type RoleName = keyof RoleControls;

/** What openInstrument hands back. */
export interface OpenedInstrument<R extends RoleName = RoleName> {
  session: ScpiSession;
  identity: InstrumentIdentity;
  control: RoleControls[R];
  profileId: string;
  address: string;
  close(): Promise<void>;
}
