/** The shared check for programs the tests need: fails under CI naming the package, skips loudly elsewhere. */
import { existsSync } from 'node:fs';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { decideMissing, MissingToolError, packageInDistribution, REQUIRED_TOOLS, requireTool } from '../../helpers/required-tool';

describe('requireTool', () => {
  const saved = { CI: process.env.CI, PATH: process.env.PATH };
  afterEach(() => {
    process.env.CI = saved.CI;
    process.env.PATH = saved.PATH;
    if (saved.CI === undefined) delete process.env.CI;
    vi.restoreAllMocks();
  });

  it('under CI=true a missing program throws, naming the Debian package', () => {
    process.env.CI = 'true';
    process.env.PATH = '/nonexistent-folder';
    expect(() => requireTool('pdftotext')).toThrow(MissingToolError);
    expect(() => requireTool('pdftotext')).toThrow(/pdftotext not found.*apt-get install poppler-utils/);
  });

  it('outside CI it returns false and prints the same message', () => {
    delete process.env.CI;
    process.env.PATH = '/nonexistent-folder';
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => undefined);
    expect(requireTool('socat', 'ngspice')).toBe(false);
    expect(warn).toHaveBeenCalledWith(expect.stringMatching(/^SKIPPED \(not under CI\): socat, ngspice not found.*apt-get install socat ngspice/));
  });

  it('under CI=true an optional program (lxi) missing skips only when the distribution has no package for it', () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => undefined);
    const has = (available: string[]) => (debianPackage: string) => available.includes(debianPackage);
    expect(() => decideMissing(['lxi'], true, has(['lxi-tools']))).toThrow(/lxi not found.*apt-get install lxi-tools/);
    expect(decideMissing(['lxi'], true, has([]))).toBe(false);
    expect(warn).toHaveBeenCalledWith(expect.stringMatching(/^SKIPPED \(optional, and not in this distribution's package lists: lxi-tools\): lxi not found/));
    // A required program missing alongside still fails, whatever the distribution has.
    expect(() => decideMissing(['lxi', 'rpcbind'], true, has([]))).toThrow(MissingToolError);
    expect(() => decideMissing(['rpcbind'], true, has([]))).toThrow(/rpcbind not found.*apt-get install rpcbind/);
  });

  it('asks the package manager whether the distribution has a package', () => {
    expect(packageInDistribution('rolloff-no-such-package')).toBe(false);
    // python3 is in every Debian release; this only holds where apt-cache exists.
    if (requireTool('python3') && existsSync('/usr/bin/apt-cache')) expect(packageInDistribution('python3')).toBe(true);
  });

  it('a program that is there passes', () => {
    process.env.CI = 'true';
    process.env.PATH = '/bin:/usr/bin';
    expect(REQUIRED_TOOLS.python3.debianPackage).toBe('python3');
    expect(requireTool('python3')).toBe(true);
  });
});
