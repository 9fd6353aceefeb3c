/** The shared check for programs the tests need: fails under CI naming the package, skips loudly elsewhere. */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { MissingToolError, REQUIRED_TOOLS, requireTool } from '../../helpers/required-tool';

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

  it('a program that is there passes', () => {
    process.env.CI = 'true';
    process.env.PATH = '/bin:/usr/bin';
    expect(REQUIRED_TOOLS.python3.debianPackage).toBe('python3');
    expect(requireTool('python3')).toBe(true);
  });
});
