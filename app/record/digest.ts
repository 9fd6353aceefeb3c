/**
 * The record digest: SHA-256 (FIPS 180-4) of the UTF-8 bytes of the RFC 8785
 * canonical JSON of the object built below. DIGEST.md documents the same
 * fields for a reader who wants to recompute it from a JSON record.
 */
import { canonicalJson } from './canonical-json';
import { sha256Hex } from './sha256';
import type { RecordDigest, RunRecord } from './model';

export const RUN_DIGEST_TAG = 'rolloff-run-digest-1';
export const COMPARISON_DIGEST_TAG = 'rolloff-comparison-digest-1';

export const RUN_DIGEST_METHOD =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${RUN_DIGEST_TAG}", ` +
  'run:{id,kind,startedAt,endedAt,simulated,plan}, build:{id,label,actualValues}, design:{name}, ' +
  'instruments:bench[] as {role,address,profileId,simulated,identity}, points:all point columns}, ' +
  'with non-finite numbers as null. See app/record/DIGEST.md.';

export const COMPARISON_DIGEST_METHOD =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${COMPARISON_DIGEST_TAG}", ` +
  'reference, runs:[each run digest hex, in record order]}. See app/record/DIGEST.md.';

/** The exact object whose canonical JSON is hashed; takes only fields the JSON record carries. */
export function runDigestInput(record: Pick<RunRecord, 'run' | 'build' | 'design' | 'bench' | 'points'>): unknown {
  const { run, build, design, bench, points } = record;
  return {
    digest: RUN_DIGEST_TAG,
    run: { id: run.id, kind: run.kind, startedAt: run.startedAt, endedAt: run.endedAt, simulated: run.simulated, plan: run.plan },
    build: { id: build.id, label: build.label, actualValues: build.actualValues },
    design: { name: design.name },
    instruments: bench.map((instrument) => ({
      role: instrument.role,
      address: instrument.address,
      profileId: instrument.profileId,
      simulated: instrument.simulated,
      identity: instrument.identity,
    })),
    points,
  };
}

export function runDigest(record: Pick<RunRecord, 'run' | 'build' | 'design' | 'bench' | 'points'>): RecordDigest {
  return { algorithm: 'SHA-256', method: RUN_DIGEST_METHOD, hex: sha256Hex(canonicalJson(runDigestInput(record), 'record')) };
}

export function comparisonDigest(reference: number | 'theory', runDigestsHex: string[]): RecordDigest {
  const input = { digest: COMPARISON_DIGEST_TAG, reference, runs: runDigestsHex };
  return { algorithm: 'SHA-256', method: COMPARISON_DIGEST_METHOD, hex: sha256Hex(canonicalJson(input, 'comparison')) };
}
