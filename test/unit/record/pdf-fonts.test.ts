/**
 * PDF records carry their own Unicode font: DejaVu from the dejavu-fonts-ttf
 * package, whatever fonts the OS has. That the signs then print (Ω, µ, −) is
 * read back from a real PDF with poppler's pdftotext in
 * test/integration/record/pdf-record.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { choosePdfFonts, packagedFontDirectory } from '../../../app/record/pdf-fonts';

const PACKAGE_FONTS = resolve(__dirname, '../../../node_modules/dejavu-fonts-ttf/ttf');

describe('PDF fonts', () => {
  it('embed the DejaVu fonts of the npm package, not the system ones', () => {
    expect(packagedFontDirectory()).toBe(PACKAGE_FONTS);
    const fonts = choosePdfFonts();
    expect(fonts.embedded).toBe(true);
    expect(fonts.regular).toBe(join(PACKAGE_FONTS, 'DejaVuSans.ttf'));
    expect(fonts.bold).toBe(join(PACKAGE_FONTS, 'DejaVuSans-Bold.ttf'));
    expect(fonts.mono).toBe(join(PACKAGE_FONTS, 'DejaVuSansMono.ttf'));
    for (const path of [fonts.regular, fonts.bold, fonts.mono]) expect(existsSync(path)).toBe(true);
  });

  it('with the embedded fonts Ω, µ and − are kept as typed', () => {
    expect(choosePdfFonts().printable('10 kΩ, 4.7 µF, −3 dB')).toBe('10 kΩ, 4.7 µF, −3 dB');
  });

  it('falls back to the standard fonts, spelling those signs out, only when asked or when no font is found', () => {
    const standard = choosePdfFonts(false);
    expect(standard.embedded).toBe(false);
    expect(standard.printable('10 kΩ, −3 dB')).toBe('10 kohm, -3 dB');
  });
});
