/** Parameter parsing for the simulated instruments' command handlers. */
import { DECIMAL_NUMERIC } from '../scpi/reading';
import { keywordIs } from './program-message';
import { SimCommandError } from './scpi-errors';

export function expectParamCount(params: string[], count: number): void {
  if (params.length < count) throw new SimCommandError('missingParameter');
  if (params.length > count) throw new SimCommandError('parameterNotAllowed');
}

/** One decimal numeric parameter in [min, max]; MINimum/MAXimum accepted. */
export function numberParam(params: string[], min: number, max: number): number {
  expectParamCount(params, 1);
  const text = params[0];
  if (keywordIs(text, 'MINimum')) return min;
  if (keywordIs(text, 'MAXimum')) return max;
  if (!DECIMAL_NUMERIC.test(text)) throw new SimCommandError('dataTypeError', text);
  const value = Number(text);
  if (!(value >= min && value <= max)) throw new SimCommandError('dataOutOfRange', text);
  return value;
}

export function booleanParam(params: string[]): boolean {
  expectParamCount(params, 1);
  const text = params[0].toUpperCase();
  if (text === 'ON' || text === '1') return true;
  if (text === 'OFF' || text === '0') return false;
  throw new SimCommandError('illegalParameterValue', params[0]);
}

/** Which of `keywords` the single parameter is (short or long form). */
export function keywordParam<K extends string>(params: string[], keywords: readonly K[]): K {
  expectParamCount(params, 1);
  const found = keywords.find((k) => keywordIs(params[0], k));
  if (!found) throw new SimCommandError('illegalParameterValue', params[0]);
  return found;
}

/** A quoted string parameter, quotes removed. */
export function stringParam(params: string[]): string {
  expectParamCount(params, 1);
  const match = /^(["'])(.*)\1$/.exec(params[0]);
  if (!match) throw new SimCommandError('dataTypeError', params[0]);
  return match[2];
}

/** NR3 for replies, e.g. +1.23456789E-01 (IEEE 488.2 §8.7.4 form). */
export function formatNr3(value: number): string {
  const [mantissa, exponent] = value.toExponential(8).split('e');
  const exp = Number(exponent);
  return `${value >= 0 ? '+' : ''}${mantissa}E${exp >= 0 ? '+' : '-'}${String(Math.abs(exp)).padStart(2, '0')}`;
}
