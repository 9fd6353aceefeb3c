/**
 * The record digest: SHA-256 (FIPS 180-4) of the UTF-8 bytes of the RFC 8785
 * canonical JSON of the object built below. DIGEST.md documents the same
 * fields for a reader who wants to recompute it from a JSON record.
 *
 * Version 2 names the run, its build and its design by their stable ids (uid),
 * which a copy between stores keeps, instead of the store's row numbers, which
 * it does not; version 1 records (exported before) still verify with version 1.
 */
import { canonicalJson } from './canonical-json';
import { sha256Hex } from './sha256';
import type { NoiseRunRecord, RecordDigest, RunRecord } from './model';

export const RUN_DIGEST_TAG = 'rolloff-run-digest-2';
export const COMPARISON_DIGEST_TAG = 'rolloff-comparison-digest-2';
const RUN_DIGEST_TAG_1 = 'rolloff-run-digest-1';
const COMPARISON_DIGEST_TAG_1 = 'rolloff-comparison-digest-1';
export const NOISE_RUN_DIGEST_TAG = 'rolloff-noise-run-digest-1';

export const RUN_DIGEST_METHOD =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${RUN_DIGEST_TAG}", ` +
  'run:{uid,kind,startedAt,endedAt,simulated,plan without buildId}, build:{uid,label,actualValues}, design:{uid,name}, ' +
  'instruments:bench[] as {role,address,profileId,simulated,identity}, points:all point columns}, ' +
  'with non-finite numbers as null. See app/record/DIGEST.md.';

const RUN_DIGEST_METHOD_1 =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${RUN_DIGEST_TAG_1}", ` +
  'run:{id,kind,startedAt,endedAt,simulated,plan}, build:{id,label,actualValues}, design:{name}, ' +
  'instruments:bench[] as {role,address,profileId,simulated,identity}, points:all point columns}, ' +
  'with non-finite numbers as null. See app/record/DIGEST.md.';

export const NOISE_RUN_DIGEST_METHOD =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${NOISE_RUN_DIGEST_TAG}", ` +
  'run:{uid,kind,startedAt,endedAt,simulated,plan without buildId,acquisition}, build:{uid,label,actualValues}, design:{uid,name}, ' +
  'instruments:bench[] as {role,address,profileId,simulated,identity}, records:all record columns, ' +
  'density:{frequencyHz,measuredVPerRtHz,uncertaintyVPerRtHz,low95VPerRtHz,high95VPerRtHz}}, with non-finite numbers as null. See app/record/DIGEST.md.';

export const COMPARISON_DIGEST_METHOD =
  `SHA-256 (FIPS 180-4) of the UTF-8 RFC 8785 canonical JSON of {"digest":"${COMPARISON_DIGEST_TAG}", ` +
  'reference (the reference run\'s uid, or "theory"), runs:[each run digest hex, in record order]}. See app/record/DIGEST.md.';

type DigestedRun = Pick<RunRecord, 'run' | 'build' | 'design' | 'bench' | 'points'>;

/** The instruments, the same in both versions. */
function instrumentsOf(record: Pick<RunRecord, 'bench'>): unknown[] {
  return record.bench.map((instrument) => ({
    role: instrument.role,
    address: instrument.address,
    profileId: instrument.profileId,
    simulated: instrument.simulated,
    identity: instrument.identity,
  }));
}

/** The exact object whose canonical JSON is hashed; takes only fields the JSON record carries. */
export function runDigestInput(record: DigestedRun): unknown {
  const { run, build, design, points } = record;
  // The plan names its build by row id, which a copy renumbers; build.uid names the build instead.
  const { buildId: _buildId, ...plan } = run.plan;
  return {
    digest: RUN_DIGEST_TAG,
    run: { uid: run.uid, kind: run.kind, startedAt: run.startedAt, endedAt: run.endedAt, simulated: run.simulated, plan },
    build: { uid: build.uid, label: build.label, actualValues: build.actualValues },
    design: { uid: design.uid, name: design.name },
    instruments: instrumentsOf(record),
    points,
  };
}

/** Version 1, for records exported before stable ids: row ids in place of uids. */
function runDigestInputV1(record: DigestedRun): unknown {
  const { run, build, design, points } = record;
  return {
    digest: RUN_DIGEST_TAG_1,
    run: { id: run.id, kind: run.kind, startedAt: run.startedAt, endedAt: run.endedAt, simulated: run.simulated, plan: run.plan },
    build: { id: build.id, label: build.label, actualValues: build.actualValues },
    design: { name: design.name },
    instruments: instrumentsOf(record),
    points,
  };
}

/** The measurement of a noise run: its records and the density they give; the computed density is derived, not hashed. */
export function noiseRunDigestInput(record: Pick<NoiseRunRecord, 'run' | 'build' | 'design' | 'bench' | 'records' | 'density'>): unknown {
  const { run, build, design, records, density } = record;
  const { buildId: _buildId, ...plan } = run.plan;
  return {
    digest: NOISE_RUN_DIGEST_TAG,
    run: { uid: run.uid, kind: run.kind, startedAt: run.startedAt, endedAt: run.endedAt, simulated: run.simulated, plan, acquisition: run.acquisition },
    build: { uid: build.uid, label: build.label, actualValues: build.actualValues },
    design: { uid: design.uid, name: design.name },
    instruments: instrumentsOf(record),
    records,
    density: {
      frequencyHz: density.frequencyHz,
      measuredVPerRtHz: density.measuredVPerRtHz,
      uncertaintyVPerRtHz: density.uncertaintyVPerRtHz,
      low95VPerRtHz: density.low95VPerRtHz,
      high95VPerRtHz: density.high95VPerRtHz,
    },
  };
}

export function noiseRunDigest(record: Pick<NoiseRunRecord, 'run' | 'build' | 'design' | 'bench' | 'records' | 'density'>): RecordDigest {
  return { algorithm: 'SHA-256', method: NOISE_RUN_DIGEST_METHOD, hex: sha256Hex(canonicalJson(noiseRunDigestInput(record), 'record')) };
}

export function runDigest(record: DigestedRun): RecordDigest {
  return { algorithm: 'SHA-256', method: RUN_DIGEST_METHOD, hex: sha256Hex(canonicalJson(runDigestInput(record), 'record')) };
}

/** The digest a record read back should carry: by the version its own method names (a record without uids is version 1). */
export function expectedRunDigestHex(record: DigestedRun & { digest: RecordDigest }): string {
  const version1 = record.digest.method.includes(RUN_DIGEST_TAG_1) || record.run.uid === undefined;
  return version1 ? sha256Hex(canonicalJson(runDigestInputV1(record), 'record')) : runDigest(record).hex;
}

/** `reference` is the reference run's uid (the store's run id in version 1), or "theory". */
export function comparisonDigest(reference: string | 'theory', runDigestsHex: string[]): RecordDigest {
  const input = { digest: COMPARISON_DIGEST_TAG, reference, runs: runDigestsHex };
  return { algorithm: 'SHA-256', method: COMPARISON_DIGEST_METHOD, hex: sha256Hex(canonicalJson(input, 'comparison')) };
}

/** The comparison digest a record read back should carry, by the version its method names. */
export function expectedComparisonDigestHex(method: string, reference: number | 'theory', runs: DigestedRun[], runDigestsHex: string[]): string {
  if (method.includes(COMPARISON_DIGEST_TAG_1)) {
    return sha256Hex(canonicalJson({ digest: COMPARISON_DIGEST_TAG_1, reference, runs: runDigestsHex }, 'comparison'));
  }
  return comparisonDigest(referenceLabel(reference, runs), runDigestsHex).hex;
}

/** The reference as version 2 hashes it: the reference run's uid, or "theory". */
export function referenceLabel(reference: number | 'theory', runs: DigestedRun[]): string {
  if (reference === 'theory') return 'theory';
  return runs.find((r) => r.run.id === reference)?.run.uid ?? String(reference);
}
