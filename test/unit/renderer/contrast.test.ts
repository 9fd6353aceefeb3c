/**
 * Text and background colours of the window meet the WCAG 2.1 contrast minimum
 * for normal text, 4.5:1 (success criterion 1.4.3), computed with WCAG 2.1's
 * relative-luminance and contrast-ratio definitions from the colours declared
 * in renderer/styles.css.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';

const css = readFileSync(resolve(__dirname, '../../../renderer/styles.css'), 'utf8');
const variables = new Map([...css.matchAll(/--([\w-]+):\s*(#[0-9a-fA-F]{6})/g)].map((m) => [m[1], m[2]]));

function colour(nameOrHex: string): string {
  const value = nameOrHex.startsWith('#') ? nameOrHex : variables.get(nameOrHex);
  if (!value) throw new Error(`no colour ${nameOrHex} in styles.css`);
  return value;
}

/** WCAG 2.1 relative luminance of an sRGB colour. */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

function contrast(a: string, b: string): number {
  const [light, dark] = [luminance(colour(a)), luminance(colour(b))].sort((x, y) => y - x);
  return (light + 0.05) / (dark + 0.05);
}

describe('colour contrast', () => {
  it('computes the WCAG ratio correctly (black on white is 21:1, white on white 1:1)', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
    expect(contrast('#ffffff', '#ffffff')).toBeCloseTo(1, 6);
  });

  it.each([
    ['ink', 'paper'],
    ['ink', 'panel'],
    ['muted', 'panel'],
    ['muted', 'paper'],
    ['rail-text', 'rail'],
    ['accent-ink', 'accent'],
    ['#ffffff', 'danger'],
    ['danger', 'panel'],
    ['#231a00', 'sim'],
  ])('%s on %s is at least 4.5:1', (text, background) => {
    expect(contrast(text, background)).toBeGreaterThanOrEqual(4.5);
  });
});
