/** The --band FROM:TO option of the commands that take a noise band (theory --noise, noise). */
import { ValidationError } from '../../errors';
import { parseEngineering } from '../../units';

/** "10:100k" → [10, 100000], engineering notation on both sides. */
export function parseBand(text: string): [number, number] {
  const parts = text.split(':');
  if (parts.length !== 2) throw new ValidationError('--band', `"${text}" is not FROM:TO`, 'Give the band as two frequencies in Hz joined by a colon, e.g. --band 10:100k.');
  const fromHz = parseEngineering(parts[0], '--band (from)');
  const toHz = parseEngineering(parts[1], '--band (to)');
  if (!(fromHz > 0) || !(toHz > fromHz)) throw new ValidationError('--band', `${fromHz} Hz to ${toHz} Hz is not a band`, 'The start must be above 0 Hz and the end above the start, e.g. --band 10:100k.');
  return [fromHz, toHz];
}

