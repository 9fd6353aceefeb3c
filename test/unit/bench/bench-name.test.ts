/** The bench's name: --bench, else ROLLOFF_BENCH, else the host name (common practice, no source: the host name is what a lab already calls a machine). */
import { describe, expect, it } from 'vitest';
import { resolveBenchName } from '../../../app/bench/bench-name';
import { ValidationError } from '../../../app/errors';

describe('resolveBenchName', () => {
  const host = () => 'lab-pc-07';
  it('takes --bench over ROLLOFF_BENCH over the host name, trimmed', () => {
    expect(resolveBenchName(' bench 3 ', { ROLLOFF_BENCH: 'bench 9' }, host)).toBe('bench 3');
    expect(resolveBenchName(undefined, { ROLLOFF_BENCH: 'bench 9' }, host)).toBe('bench 9');
    expect(resolveBenchName(undefined, {}, host)).toBe('lab-pc-07');
    expect(resolveBenchName(undefined, { ROLLOFF_BENCH: '' }, host)).toBe('lab-pc-07');
  });
  it('refuses an empty, overlong or garbling name, naming where it came from', () => {
    expect(() => resolveBenchName('  ', {}, host)).toThrow(ValidationError);
    expect(() => resolveBenchName('  ', {}, host)).toThrow(/--bench/);
    expect(() => resolveBenchName(undefined, { ROLLOFF_BENCH: 'a'.repeat(65) }, host)).toThrow(/ROLLOFF_BENCH.*longer than 64/);
    expect(() => resolveBenchName('bench\n3', {}, host)).toThrow(/control characters/);
  });
});
