/**
 * The name a bench goes by in a lab store: what the user gave with --bench or
 * ROLLOFF_BENCH, else this machine's host name, so a plain sweep needs no
 * set-up step. Every run records it; the lab's history can be filtered by it.
 */
import { hostname } from 'node:os';
import { ValidationError } from '../errors';

const MAX_BENCH_NAME_LENGTH = 64;

/** Trimmed, 1–64 printable characters (no control characters, which would garble tables and records). */
export function checkBenchName(name: string, where: string): string {
  const trimmed = name.trim();
  if (trimmed.length === 0) throw new ValidationError(where, 'is empty', 'Give the bench a name, e.g. --bench "bench 3", or leave it out to use the host name.');
  if (trimmed.length > MAX_BENCH_NAME_LENGTH) throw new ValidationError(where, `is ${trimmed.length} characters, longer than ${MAX_BENCH_NAME_LENGTH}`, 'Use a short name, e.g. "bench 3".');
  if (/\p{Cc}/u.test(trimmed)) throw new ValidationError(where, 'contains control characters', 'Use letters, digits, spaces and punctuation.');
  return trimmed;
}

/** --bench wins over ROLLOFF_BENCH, which wins over the host name. */
export function resolveBenchName(option: string | undefined, env: Record<string, string | undefined> = process.env, hostName: () => string = hostname): string {
  if (option !== undefined) return checkBenchName(option, '--bench');
  const fromEnv = env.ROLLOFF_BENCH;
  if (fromEnv !== undefined && fromEnv !== '') return checkBenchName(fromEnv, 'ROLLOFF_BENCH');
  return checkBenchName(hostName() || 'unnamed bench', 'host name');
}
