/**
 * A value with its standard uncertainty, rounded together as the GUM
 * (JCGM 100:2008) does: the uncertainty to at most two significant digits
 * (§7.2.6), the value to the same decimal place, both in one unit
 * (the "(100.021 47 ± 0.000 35) g" form of §7.2.2).
 * Text for people: a negative value is written with the true minus "−".
 */
import { formatEngineering, formatFixed, FORMAT_PREFIXES } from './engineering';

export function formatWithUncertainty(value: number, uncertainty: number, unit = ''): string {
  if (!Number.isFinite(value) || !Number.isFinite(uncertainty) || uncertainty <= 0) return formatEngineering(value, unit);
  // Decimal place of the uncertainty's second significant digit; a carry (0.0996 → 0.100) moves it one up.
  let place = Math.floor(Math.log10(uncertainty)) - 1;
  if (Math.round(uncertainty / 10 ** place) >= 100) place += 1;
  const roundedU = Math.round(uncertainty / 10 ** place) * 10 ** place;
  const roundedValue = Math.round(value / 10 ** place) * 10 ** place;
  const largest = Math.max(Math.abs(roundedValue), roundedU);
  const exponent = Math.max(-15, Math.min(12, Math.floor(Math.log10(largest) / 3) * 3));
  const prefix = FORMAT_PREFIXES.find(([e]) => e === exponent)![1];
  const decimals = Math.max(0, exponent - place);
  const text = (x: number) => formatFixed(x / 10 ** exponent, decimals);
  return `(${text(roundedValue)} ± ${text(roundedU)})${unit || prefix ? ` ${prefix}${unit}` : ''}`;
}
