/**
 * The design model: a circuit as drawn. A parsed Design is also a valid design
 * file (values are plain numbers in SI units), so it round-trips through JSON.
 * Field names follow the design-file format; units are given beside each field.
 */

export type PartType = 'resistor' | 'capacitor' | 'inductor' | 'diode' | 'opamp';

export interface PassivePart {
  id: string;
  type: 'resistor' | 'capacitor' | 'inductor';
  /** [a, b]. */
  nodes: [string, string];
  /** Ohms, farads or henries. */
  value: number;
  /** Relative tolerance, e.g. 0.01 for ±1 %. Absent: the value is exact. */
  tolerance?: number;
}

export interface DiodeModel {
  /** Saturation current IS, amperes. */
  is: number;
  /** Emission coefficient N (ideality factor). */
  n: number;
  /** Series resistance RS, ohms. */
  rs: number;
}

export interface DiodePart {
  id: string;
  type: 'diode';
  /** [anode, cathode]. */
  nodes: [string, string];
  model: DiodeModel;
}

export interface OpAmpModel {
  /** DC open-loop gain A0, V/V. */
  openLoopGain: number;
  /** Gain-bandwidth product, Hz. */
  gbw: number;
  /** Slew rate, V/s. Absent: no slew limit known. */
  slewRate?: number;
  /** Output swing limits [low, high], volts. Absent: no clipping known. */
  rails?: [number, number];
  /** Optional second open-loop pole, Hz. */
  secondPoleHz?: number;
  /** Input offset voltage, volts (added to the non-inverting input). */
  inputOffsetV?: number;
  /** Input bias current, amperes, flowing into each input pin. */
  inputBiasA?: number;
  /**
   * Open-loop output resistance, ohms, between the gain stage and the output
   * pin (inside the feedback loop). With a capacitive load on the output it
   * adds a pole to the loop gain: the usual cause of ringing. Absent: 0 Ω.
   * Treated as noiseless (its noise is part of the op-amp's en).
   */
  outputResistanceOhm?: number;
  /** White input voltage noise density en, V/√Hz (in series with the non-inverting input). Absent: 0. */
  voltageNoiseVPerRtHz?: number;
  /** 1/f corner of en, Hz: en(f)² = en²·(1 + corner/f). Absent: 0 (white). */
  voltageNoiseCornerHz?: number;
  /** White input current noise density in, A/√Hz, at each input pin (uncorrelated between pins). Absent: 0. */
  currentNoiseAPerRtHz?: number;
  /** 1/f corner of in, Hz: in(f)² = in²·(1 + corner/f). Absent: 0 (white). */
  currentNoiseCornerHz?: number;
  /** Treat as ideal (infinite gain, no poles) in every analysis. */
  ideal?: boolean;
}

export interface OpAmpPart {
  id: string;
  type: 'opamp';
  /** [noninverting, inverting, output]; the output is referenced to ground. */
  nodes: [string, string, string];
  model: OpAmpModel;
}

export type Part = PassivePart | DiodePart | OpAmpPart;

export interface Design {
  name: string;
  /** Node driven by the ideal stimulus source (to ground). */
  input: string;
  /** Node whose voltage is the response. */
  output: string;
  /** Temperature of the parts, °C: the diode model's junction and the resistors' thermal noise 4kTR. */
  temperatureC: number;
  parts: Part[];
  /** Free text carried through unchanged (e.g. "invented example"). */
  description?: string;
}

/** Node names that mean ground. */
export function isGroundNode(node: string): boolean {
  return node === '0' || node.toLowerCase() === 'gnd';
}
