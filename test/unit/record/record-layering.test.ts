/**
 * Most of app/record must run in the window as well as in Node (the Record view
 * can build HTML, CSV and JSON records and check digests without the service).
 * Only the PDF writer and the entry points that reach it may use Node or packages.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { build } from 'esbuild';
import { describe, expect, it } from 'vitest';

const RECORD_DIR = new URL('../../../app/record/', import.meta.url).pathname;
/** Files allowed to need Node or npm packages: PDF writing and what imports it. */
const NODE_SIDE = new Set(['pdf-fonts.ts', 'pdf-plot.ts', 'pdf-record.ts', 'render-record.ts', 'index.ts']);
const PURE_OUTSIDE = ['../errors', '../units', '../numeric', '../plot-layout/marker-label-placement', '../contract/contract', '../contract/safety', '../contract/version', '../contract/vocabulary', '../contract/plot-palette', '../analysis/noise-figure-rows'];
/** The one package the window-safe part may use: the JSON Schema validator (interprets, no eval). */
const PURE_PACKAGES: Record<string, string> = { '@cfworker/json-schema': 'schema-validator.ts' };

function importsOf(source: string): string[] {
  return [...source.matchAll(/(?:^|\n)\s*(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]/g)].map((m) => m[1]);
}

describe('app/record layering', () => {
  const files = readdirSync(RECORD_DIR).filter((f) => f.endsWith('.ts'));

  it('finds the record sources', () => {
    expect(files.length).toBeGreaterThan(15);
  });

  it('pure record files import only other pure record files and pure modules', () => {
    const problems: string[] = [];
    for (const file of files.filter((f) => !NODE_SIDE.has(f))) {
      for (const specifier of importsOf(readFileSync(join(RECORD_DIR, file), 'utf8'))) {
        const local = specifier.startsWith('./') && !NODE_SIDE.has(specifier.slice(2) + '.ts');
        if (!local && !PURE_OUTSIDE.includes(specifier) && PURE_PACKAGES[specifier] !== file) problems.push(`${file} imports ${specifier}`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('the window-safe entry (pure.ts) bundles for the browser with no Node built-ins', async () => {
    const result = await build({ entryPoints: [join(RECORD_DIR, 'pure.ts')], bundle: true, platform: 'browser', format: 'esm', write: false, logLevel: 'silent' });
    expect(result.errors).toEqual([]);
    expect(result.outputFiles[0].text).toContain('rolloff-run-digest-2');
  });

  it('the check sees the Node side (guards against a vacuous pass)', () => {
    expect(importsOf(readFileSync(join(RECORD_DIR, 'pdf-record.ts'), 'utf8'))).toContain('pdfkit');
  });
});
