/**
 * Bad input of every kind: a seeded fuzzer mutates fields of valid design
 * files into junk. parseDesign must either accept the result or refuse it
 * with a user-facing error (never a TypeError or a hang), and whatever it
 * accepts must solve (common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { makeDesignFromTemplate, parseDesign, solveAc, TEMPLATES } from '../../../app/circuit';
import { SeededRandom } from '../../../app/numeric';
import { isUserError } from '../../../app/errors';

const JUNK: unknown[] = [null, undefined, 0, -1, 1e308, NaN, '', ' ', 'x', '1k', '-5', '1e999', [], [1, 2], {}, { a: 1 }, true, 'gnd', '0', 'in', 'out', '10%'];

function mutate(value: unknown, random: SeededRandom, depth = 0): unknown {
  if (Array.isArray(value)) {
    const copy = value.map((v) => (random.nextUniform() < 0.3 ? mutate(v, random, depth + 1) : v));
    if (random.nextUniform() < 0.1) copy.pop();
    if (random.nextUniform() < 0.1) copy.push(JUNK[Math.floor(random.nextUniform() * JUNK.length)]);
    return copy;
  }
  if (value !== null && typeof value === 'object') {
    const copy: Record<string, unknown> = { ...(value as Record<string, unknown>) };
    for (const key of Object.keys(copy)) {
      const roll = random.nextUniform();
      if (roll < 0.08) delete copy[key];
      else if (roll < 0.2) copy[key] = JUNK[Math.floor(random.nextUniform() * JUNK.length)];
      else if (roll < 0.5 && depth < 4) copy[key] = mutate(copy[key], random, depth + 1);
    }
    return copy;
  }
  return random.nextUniform() < 0.5 ? JUNK[Math.floor(random.nextUniform() * JUNK.length)] : value;
}

describe('parseDesign under fuzzed input', () => {
  it('accepts or refuses with a user error, for 3000 mutated design files', () => {
    const random = new SeededRandom(2024);
    let accepted = 0;
    let refused = 0;
    for (let i = 0; i < 3000; i++) {
      const template = TEMPLATES[i % TEMPLATES.length];
      const json = mutate(makeDesignFromTemplate(template.id), random);
      try {
        const design = parseDesign(json, `fuzz ${i}`);
        const response = solveAc(design, Float64Array.from([10, 1e3, 1e5]));
        for (const gainDb of response.gainDb) if (Number.isNaN(gainDb)) throw new Error(`case ${i} (${template.id}) gave NaN gain: ${JSON.stringify(json)}`);
        accepted++;
      } catch (error) {
        if (!isUserError(error)) throw new Error(`case ${i} (${template.id}) threw a non-user error: ${String(error)}\n${JSON.stringify(json)}`);
        expect((error as Error).message.length).toBeGreaterThan(10);
        refused++;
      }
    }
    // Both outcomes occur, so the fuzzer is neither too gentle nor too harsh to mean anything.
    expect(accepted).toBeGreaterThan(50);
    expect(refused).toBeGreaterThan(500);
  });
});
