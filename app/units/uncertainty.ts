/**
 * A value with its standard uncertainty, rounded together as the GUM
 * (JCGM 100:2008) does: the uncertainty to at most two significant digits
 * (§7.2.6), the value to the same decimal place, both in one unit
 * (the "(100.021 47 ± 0.000 35) g" form of §7.2.2).
 * Text for people: a negative value is written with the true minus "−".
 * Units that take no SI prefix (dB, °) pass `{ prefix: false }`: the numbers
 * stay in the unit given, "(19.960 123 ± 0.000 059) dB" as "(19.960123 ± 0.000059) dB".
 */
import { formatEngineering, formatFixed, FORMAT_PREFIXES } from './engineering';

export function formatWithUncertainty(value: number, uncertainty: number, unit = '', options: { prefix?: boolean } = {}): string {
  const prefixed = options.prefix ?? true;
  if (!Number.isFinite(value) || !Number.isFinite(uncertainty) || uncertainty <= 0) return prefixed ? formatEngineering(value, unit) : `${formatFixed(value, 3)}${unit === '°' ? '°' : unit ? ` ${unit}` : ''}`;
  // Decimal place of the uncertainty's second significant digit; a carry (0.0996 → 0.100) moves it one up.
  let place = Math.floor(Math.log10(uncertainty)) - 1;
  if (Math.round(uncertainty / 10 ** place) >= 100) place += 1;
  const roundedU = Math.round(uncertainty / 10 ** place) * 10 ** place;
  const roundedValue = Math.round(value / 10 ** place) * 10 ** place;
  const largest = Math.max(Math.abs(roundedValue), roundedU);
  const exponent = prefixed ? Math.max(-15, Math.min(12, Math.floor(Math.log10(largest) / 3) * 3)) : 0;
  const prefix = FORMAT_PREFIXES.find(([e]) => e === exponent)![1];
  const decimals = Math.max(0, exponent - place);
  const text = (x: number) => formatFixed(x / 10 ** exponent, decimals);
  // The degree sign follows the number without a space (SI Brochure, 9th ed., §5.4.3).
  const unitText = unit === '°' && !prefix ? '°' : unit || prefix ? ` ${prefix}${unit}` : '';
  return `(${text(roundedValue)} ± ${text(roundedU)})${unitText}`;
}
