/**
 * The one check for a program a test needs (ngspice, socat, Chromium, poppler,
 * python3, rpcbind, …). Under CI=true a missing program fails the test file,
 * naming the Debian package to install (test/install-debian-packages.sh holds
 * the list CI installs); elsewhere the file is skipped and the same message is
 * printed, so a skipped check is never silent. A tool marked optional (its
 * package is not in every Debian release) fails under CI=true only when the
 * distribution has its package; when it has none, the check skips under CI
 * too, with the same message and the reason.
 *
 *   const hasSocat = requireTool('socat');
 *   describe.skipIf(!hasSocat)('…', () => { … });
 */
import { execFileSync } from 'node:child_process';
import { accessSync, constants, existsSync } from 'node:fs';
import { delimiter, isAbsolute, join } from 'node:path';

interface Tool {
  /** Program name looked up on PATH, or an absolute path. */
  program: string;
  debianPackage: string;
  /** A file the package installs, for a package that adds no program of its own (a Python module). */
  alsoNeeds?: string;
  /** Installed when the distribution has the package (test/install-debian-packages.sh): CI fails on it only then. */
  optional?: boolean;
}

/** Programs the tests use, with the Debian package that ships each. */
export const REQUIRED_TOOLS = {
  ngspice: { program: 'ngspice', debianPackage: 'ngspice' },
  socat: { program: 'socat', debianPackage: 'socat' },
  chromium: { program: '/usr/bin/chromium', debianPackage: 'chromium' },
  pdftoppm: { program: 'pdftoppm', debianPackage: 'poppler-utils' },
  pdftotext: { program: 'pdftotext', debianPackage: 'poppler-utils' },
  python3: { program: 'python3', debianPackage: 'python3' },
  git: { program: 'git', debianPackage: 'git' },
  rpcbind: { program: 'rpcbind', debianPackage: 'rpcbind' },
  /** Debian's own python3 with its pyvisa-py package (a pyenv python on PATH lacks it). */
  pyvisaPy: { program: '/usr/bin/python3', debianPackage: 'python3-pyvisa-py', alsoNeeds: '/usr/lib/python3/dist-packages/pyvisa_py/__init__.py' },
  lxi: { program: 'lxi', debianPackage: 'lxi-tools', optional: true },
  xvfb: { program: 'xvfb-run', debianPackage: 'xvfb' },
  /** A network namespace of its own (as root): a machine where no portmapper answers. */
  unshare: { program: 'unshare', debianPackage: 'util-linux' },
  ip: { program: 'ip', debianPackage: 'iproute2' },
  // Debian keeps it off PATH, in /usr/lib/postgresql/N/bin: test/helpers/postgres-cluster.ts looks there first.
  initdb: { program: 'initdb', debianPackage: 'postgresql' },
} satisfies Record<string, Tool>;

export type ToolName = keyof typeof REQUIRED_TOOLS;

export class MissingToolError extends Error {}

/**
 * True when every named program is there. When one is missing: throws under
 * CI=true (unless every missing one is optional and its package is not in
 * the distribution), else prints why and returns false.
 */
export function requireTool(...names: ToolName[]): boolean {
  return decideMissing(names.filter((name) => !toolPath(name)), isCi(), packageInDistribution);
}

/** requireTool's decision about the programs found missing; `inDistribution` tells whether the package manager offers a package. */
export function decideMissing(missing: ToolName[], ci: boolean, inDistribution: (debianPackage: string) => boolean): boolean {
  if (missing.length === 0) return true;
  const message = missingToolMessage(missing);
  if (!ci) {
    console.warn(`SKIPPED (not under CI): ${message}`);
    return false;
  }
  const unavailable = missing.filter((name) => optionalTool(name) && !inDistribution(REQUIRED_TOOLS[name].debianPackage));
  if (unavailable.length < missing.length) throw new MissingToolError(message);
  const packages = [...new Set(unavailable.map((name) => REQUIRED_TOOLS[name].debianPackage))];
  console.warn(`SKIPPED (optional, and not in this distribution's package lists: ${packages.join(' ')}): ${message}`);
  return false;
}

/** The package manager has an install candidate for the package (`apt-cache policy`: "Candidate:" other than "(none)"). */
export function packageInDistribution(debianPackage: string): boolean {
  try {
    const policy = execFileSync('apt-cache', ['policy', debianPackage], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'], timeout: 10_000 });
    const candidate = /^\s*Candidate:\s*(\S+)/m.exec(policy)?.[1];
    return candidate !== undefined && candidate !== '(none)';
  } catch {
    return false; // no apt-cache: not a Debian-like system, so no Debian package to install either
  }
}

function optionalTool(name: ToolName): boolean {
  const tool: Tool = REQUIRED_TOOLS[name];
  return tool.optional === true;
}

/** Where the program is, or undefined. */
export function toolPath(name: ToolName): string | undefined {
  const tool: Tool = REQUIRED_TOOLS[name];
  const { program } = tool;
  if (tool.alsoNeeds !== undefined && !existsSync(tool.alsoNeeds)) return undefined;
  if (isAbsolute(program)) return isExecutable(program) ? program : undefined;
  for (const folder of (process.env.PATH ?? '').split(delimiter)) {
    if (folder && isExecutable(join(folder, program))) return join(folder, program);
  }
  return undefined;
}

export function missingToolMessage(names: ToolName[]): string {
  const packages = [...new Set(names.map((name) => REQUIRED_TOOLS[name].debianPackage))];
  return `${names.map((name) => REQUIRED_TOOLS[name].program).join(', ')} not found; this test needs it. Install it with: apt-get install ${packages.join(' ')} (or run bash test/install-debian-packages.sh).`;
}

function isCi(): boolean {
  const value = process.env.CI;
  return value !== undefined && value !== '' && value !== '0' && value.toLowerCase() !== 'false';
}

function isExecutable(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

/** PATH with every folder that holds one of `programs` left out: runs a command as on a machine that lacks them (udevadm on minimal installs). */
export function pathWithout(programs: string[], path = process.env.PATH ?? ''): string {
  return path
    .split(delimiter)
    .filter((folder) => folder && !programs.some((program) => isExecutable(join(folder, program))))
    .join(delimiter);
}
