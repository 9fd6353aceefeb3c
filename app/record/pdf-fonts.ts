/**
 * Fonts for PDF records. A Unicode TrueType font (DejaVu) is embedded (subset),
 * so notes in any Latin, Greek or Cyrillic script and signs such as − Ω µ Δ ≤
 * print as typed on any OS. It comes from the npm package dejavu-fonts-ttf
 * (a dependency, so every install has it); only if that package is missing
 * are the usual system font folders tried. Without either the PDF standard
 * fonts are used, which only cover the WinAnsi character set (PDF 32000-1:2008
 * Annex D.2), and other characters are spelled out or replaced by "?"; the HTML
 * and JSON records always keep the full text.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

export interface PdfFontSet {
  regular: string;
  bold: string;
  mono: string;
  /** Makes a string printable in these fonts. */
  printable(text: string): string;
  embedded: boolean;
}

const SYSTEM_FONT_DIRECTORIES = ['/usr/share/fonts/truetype/dejavu', '/usr/share/fonts/dejavu', '/usr/share/fonts/TTF'];

/** The ttf folder of the dejavu-fonts-ttf package, or undefined when it is not installed. */
export function packagedFontDirectory(): string | undefined {
  try {
    return join(dirname(createRequire(import.meta.url).resolve('dejavu-fonts-ttf/package.json')), 'ttf');
  } catch {
    return undefined;
  }
}
const FONT_FILES = { regular: 'DejaVuSans.ttf', bold: 'DejaVuSans-Bold.ttf', mono: 'DejaVuSansMono.ttf' };

/** Characters outside WinAnsi that records use, spelled in WinAnsi. */
const WINANSI_SPELLINGS: Record<string, string> = {
  '−': '-', '–': '-', '—': '-', '…': '...', 'Ω': 'ohm', 'Δ': 'delta ', '≤': '<=', '≥': '>=', '≈': '~', '×': 'x', 'μ': 'µ', '→': '->', '•': '-',
};

/** Characters of WinAnsiEncoding above 0x7E besides Latin-1 (PDF 32000-1 Annex D.2). */
const WINANSI_EXTRAS = new Set('€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ');

function winAnsiPrintable(text: string): string {
  let out = '';
  for (const c of text) {
    const code = c.codePointAt(0)!;
    if (WINANSI_SPELLINGS[c] !== undefined) out += WINANSI_SPELLINGS[c];
    else if (code === 0x09 || code === 0x0a || (code >= 0x20 && code <= 0x7e) || (code >= 0xa0 && code <= 0xff) || WINANSI_EXTRAS.has(c)) out += c;
    else out += '?';
  }
  return out;
}

/** Control characters (other than tab and newline) would be drawn as boxes or break PDF text; drop them. */
function withoutControls(text: string): string {
  return text.replace(/[\u0000-\u0008\u000b-\u001f\u007f]/g, '');
}

export function choosePdfFonts(preferEmbedded = true): PdfFontSet {
  if (preferEmbedded) {
    const packaged = packagedFontDirectory();
    for (const directory of packaged ? [packaged, ...SYSTEM_FONT_DIRECTORIES] : SYSTEM_FONT_DIRECTORIES) {
      const paths = Object.fromEntries(Object.entries(FONT_FILES).map(([k, f]) => [k, `${directory}/${f}`])) as typeof FONT_FILES;
      if (Object.values(paths).every((p) => existsSync(p))) {
        return { ...paths, embedded: true, printable: (text) => withoutControls(text) };
      }
    }
  }
  return { regular: 'Helvetica', bold: 'Helvetica-Bold', mono: 'Courier', embedded: false, printable: (text) => winAnsiPrintable(withoutControls(text)) };
}
