/**
 * Engineering notation: the one place that parses and formats SI-prefixed numbers.
 * Accepts what bench people type: "1k", "15n", "4.7u", "4.7µ", "2meg", "1e-3",
 * "10 kHz" (a trailing SI unit word is accepted and ignored).
 */
import { ValidationError } from '../errors';

const PREFIX_EXPONENTS: Record<string, number> = {
  f: -15,
  p: -12,
  n: -9,
  u: -6,
  µ: -6,
  μ: -6, // Greek mu, which some keyboards produce instead of the micro sign
  m: -3,
  k: 3,
  K: 3,
  M: 6,
  meg: 6,
  MEG: 6,
  Meg: 6,
  G: 9,
  T: 12,
};

/** Unit words a user may append ("10 kHz", "4.7uF"); anything else is refused. */
const UNIT_WORDS = '(?:Hz|F|H|V|Vpp|Vrms|Vpk|A|s|Ω|ohm|ohms|deg|dB)';
const NUMBER_PATTERN = new RegExp(
  `^\\s*([+\\-−]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?)\\s*(meg|Meg|MEG|[fpnuµμmkKMGT])?\\s*(${UNIT_WORDS})?\\s*$`,
);

/**
 * Parses a number in engineering notation. `where` names the field for the error.
 * Note: as in circuit simulators, "m" is milli and "meg"/"M" is mega.
 */
export function parseEngineering(text: string | number, where = 'value'): number {
  if (typeof text === 'number') {
    if (!Number.isFinite(text)) throw new ValidationError(where, `${text} is not a finite number`);
    return text;
  }
  const match = NUMBER_PATTERN.exec(text);
  if (!match) {
    throw new ValidationError(
      where,
      `"${text}" is not a number`,
      'Use a plain number or engineering notation such as 1k, 15n, 4.7u, 2meg, 1e-3.',
    );
  }
  // People copy numbers from Rolloff's own output, which writes the true minus.
  const mantissa = Number(match[1].replace('−', '-'));
  const prefix = match[2];
  const exponent = prefix === undefined ? 0 : PREFIX_EXPONENTS[prefix];
  const value = mantissa * 10 ** exponent;
  if (!Number.isFinite(value)) throw new ValidationError(where, `"${text}" is out of range`);
  return value;
}

export const FORMAT_PREFIXES: Array<[number, string]> = [
  [12, 'T'],
  [9, 'G'],
  [6, 'M'],
  [3, 'k'],
  [0, ''],
  [-3, 'm'],
  [-6, 'µ'],
  [-9, 'n'],
  [-12, 'p'],
  [-15, 'f'],
];

/**
 * Numbers written for people use the true minus sign "−" (U+2212 MINUS SIGN,
 * the sign ISO 80000-2 gives); CSV, JSON and command options keep ASCII
 * "-" so every program can read them back.
 */
export function withTrueMinus(numberText: string): string {
  return numberText.replace(/-/g, '−');
}

/** value.toFixed(decimals) for people: true minus, and no sign on a value that rounds to zero. */
export function formatFixed(value: number, decimals: number): string {
  const text = value.toFixed(decimals);
  return /^-[0.]*$/.test(text) ? text.slice(1) : withTrueMinus(text);
}

/** value.toPrecision(digits) for people, with the true minus. */
export function formatPrecision(value: number, digits: number): string {
  return withTrueMinus(value.toPrecision(digits));
}

/** Formats with an SI prefix for people, e.g. formatEngineering(15e-9, 'F') → "15 nF", formatEngineering(-2e-3, 'V') → "−2 mV". */
export function formatEngineering(value: number, unit = '', significantDigits = 4): string {
  if (!Number.isFinite(value)) return `${withTrueMinus(String(value))}${unit ? ' ' + unit : ''}`;
  if (value === 0) return `0${unit ? ' ' + unit : ''}`;
  const exponent = Math.floor(Math.log10(Math.abs(value)) / 3) * 3;
  let clamped = Math.max(-15, Math.min(12, exponent));
  let rounded = Number((value / 10 ** clamped).toPrecision(significantDigits));
  // Rounding can carry into the next prefix (999.96 k → 1000 k): say 1 M instead.
  if (Math.abs(rounded) >= 1000 && clamped < 12) {
    clamped += 3;
    rounded = Number((rounded / 1000).toPrecision(significantDigits));
  }
  const entry = FORMAT_PREFIXES.find(([e]) => e === clamped)!;
  const text = withTrueMinus(rounded.toString());
  return `${text} ${entry[1]}${unit}`.trimEnd();
}

/**
 * A value in a unit that carries its own prefix, as the trade writes some
 * quantities (slew rate in V/µs): the SI value times perSi, no further prefix,
 * e.g. formatInUnit(5e5, 1e-6, 'V/µs') → "0.5 V/µs".
 */
export function formatInUnit(valueSi: number, perSi: number, unit: string, significantDigits = 4): string {
  const shown = withTrueMinus(String(Number((valueSi * perSi).toPrecision(significantDigits))));
  return unit ? `${shown} ${unit}` : shown;
}
