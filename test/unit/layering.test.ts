/**
 * Layer rule (DEVELOPERS.md "Where things live"): pure modules import nothing from node:*,
 * Electron or the DOM, and the renderer imports only pure modules and the
 * contract types. This walks the real import graph of the source files.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync, statSync, existsSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
// Folders (`app/units/`) or single files whose code must run anywhere: browser, CLI, tests; the one list is test/layering/tsconfig.pure.json's include.
import { PURE_PATHS } from '../layering/pure-folders.cjs';

const ROOT = resolve(__dirname, '../..');

/**
 * The only packages a pure module may import: small, maintained, themselves
 * pure (no Node, no DOM). app/signal uses fft.js for Welch's method rather
 * than a hand-written transform; app/contract uses valibot for its schemas
 * (no eval, so it runs in the window as in Node; see app/contract/README.md),
 * and app/circuit for the design-file schema, built from the contract's field
 * helpers.
 * The renderer reaches valibot through the contract.
 */
const PURE_PACKAGES: Record<string, readonly string[]> = {
  'app/signal': ['fft.js'],
  'app/contract': ['valibot'],
  'app/circuit': ['valibot'],
};

function allowedPackage(rel: string, specifier: string): boolean {
  return Object.entries(PURE_PACKAGES).some(([root, packages]) => rel.startsWith(root + '/') && packages.includes(specifier));
}

const NODE_BUILTINS = new Set([
  'fs', 'path', 'os', 'child_process', 'net', 'http', 'https', 'crypto', 'stream', 'events', 'util', 'url',
  'buffer', 'process', 'worker_threads', 'readline', 'tty', 'zlib', 'dgram', 'dns', 'timers', 'module',
]);

function listTs(path: string): string[] {
  const full = join(ROOT, path);
  if (!existsSync(full)) return [];
  if (statSync(full).isFile()) return full.endsWith('.ts') ? [full] : [];
  return readdirSync(full).flatMap((name) => listTs(join(path, name)));
}

function importsOf(file: string): string[] {
  const source = readFileSync(file, 'utf8');
  const found: string[] = [];
  const pattern = /(?:^|\n)\s*(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|(?:^|\n)\s*import\s*['"]([^'"]+)['"]/g;
  for (const match of source.matchAll(pattern)) found.push(match[1] ?? match[2] ?? match[3]);
  return found;
}

function resolveLocal(from: string, specifier: string): string | undefined {
  const base = resolve(dirname(from), specifier);
  for (const candidate of [base + '.ts', join(base, 'index.ts'), base]) {
    if (existsSync(candidate) && statSync(candidate).isFile()) return candidate;
  }
  return undefined;
}

const DOM_GLOBALS = /\b(?:document|window|localStorage|navigator|HTMLElement)\s*[.[]/;

function isPure(file: string): boolean {
  const rel = relative(ROOT, file);
  return PURE_PATHS.some((root) => (root.endsWith('/') ? rel.startsWith(root) : rel === root));
}

describe('layering', () => {
  const pureFiles = PURE_PATHS.flatMap(listTs).filter((f) => !f.endsWith('.test.ts'));

  it('finds the pure modules it is meant to guard', () => {
    expect(pureFiles.length).toBeGreaterThan(3);
    expect(PURE_PATHS).toContain('app/units/');
    expect(PURE_PATHS).toContain('app/errors.ts');
  });

  it('pure modules import no Node built-ins, Electron or DOM, and only other pure modules', () => {
    const problems: string[] = [];
    for (const file of pureFiles) {
      const rel = relative(ROOT, file);
      for (const specifier of importsOf(file)) {
        if (specifier.startsWith('node:') || NODE_BUILTINS.has(specifier.split('/')[0])) problems.push(`${rel} imports Node module ${specifier}`);
        else if (specifier === 'electron' || specifier.startsWith('electron/')) problems.push(`${rel} imports Electron`);
        else if (specifier.startsWith('.')) {
          const target = resolveLocal(file, specifier);
          if (!target) problems.push(`${rel} imports ${specifier}, which does not resolve to a file`);
          else if (!isPure(target)) problems.push(`${rel} imports non-pure ${relative(ROOT, target)}`);
        } else if (!allowedPackage(rel, specifier)) problems.push(`${rel} imports package ${specifier}; pure modules stay dependency-free`);
      }
      const code = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '');
      if (DOM_GLOBALS.test(code)) problems.push(`${rel} touches DOM globals`);
    }
    expect(problems).toEqual([]);
  });

  it('the renderer imports only pure modules, the contract and browser packages', () => {
    const problems: string[] = [];
    const allowedPackages = new Set(['uplot', ...PURE_PACKAGES['app/contract']]);
    for (const file of listTs('renderer')) {
      const rel = relative(ROOT, file);
      for (const specifier of importsOf(file)) {
        if (specifier.startsWith('.')) {
          const target = resolveLocal(file, specifier);
          if (!target) {
            problems.push(`${rel} imports ${specifier}, which does not resolve to a file`);
            continue;
          }
          const targetRel = relative(ROOT, target);
          if (!targetRel.startsWith('renderer/') && !isPure(target)) problems.push(`${rel} imports ${targetRel}`);
        } else if (!allowedPackages.has(specifier.split('/')[0])) problems.push(`${rel} imports package ${specifier}`);
      }
    }
    expect(problems).toEqual([]);
  });

  it('the package allowance is narrow: fft.js in app/signal only, nothing else anywhere', () => {
    expect(allowedPackage('app/signal/welch.ts', 'fft.js')).toBe(true);
    expect(allowedPackage('app/circuit/solve-noise.ts', 'fft.js')).toBe(false);
    expect(allowedPackage('app/signal/welch.ts', 'lodash')).toBe(false);
  });

  it('the checker itself catches a forbidden import (guards against a vacuous pass)', () => {
    const imports = importsOf(join(ROOT, 'test/unit/layering.test.ts'));
    expect(imports).toContain('node:fs');
  });
});
