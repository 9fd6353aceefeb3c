/**
 * Rows become records here, for both stores: SQLite and PostgreSQL return the
 * same columns (the migrations keep the names alike) and differ only in how a
 * JSON column and a boolean come back, which each store states once as its
 * ColumnReading. Timestamps already arrive as ISO 8601 text from both (the
 * PostgreSQL store's type parser turns timestamptz into it).
 */
import type { BuildRecord, DesignRecord, OfflinePeriod, PointColumns, RunStatus, RunSummary } from '../contract/contract';
import type { BenchSettings, CalibrationRecord, InstrumentRecord, NewPoint, RunOwnership, ScheduleRecord, StoredNoiseRecords, StoredPoint, StoredRun, StoredRunSummary } from './types';

export type Row = Record<string, unknown>;

/** How one database hands back the column kinds that differ between them. */
export interface ColumnReading {
  /** A JSON column: SQLite keeps the text, PostgreSQL's driver parses its json type itself. */
  json(value: unknown): unknown;
  /** A boolean column: SQLite's 0/1, PostgreSQL's true/false. */
  flag(value: unknown): boolean;
  /**
   * An owner time (owner_since_ms, owner_heartbeat_ms) in this process's clock: a
   * lab store keeps them in the server's clock (PostgresStore), one file in the
   * machine's own. Default: as stored.
   */
  ownerTimeToLocalMs?(storedMs: number): number;
}

/** The row-to-record functions of one store, over its way of reading columns. */
export interface RowMapping {
  design(row: Row): DesignRecord;
  build(row: Row): BuildRecord;
  instrument(row: Row): InstrumentRecord;
  calibration(row: Row): CalibrationRecord;
  schedule(row: Row): ScheduleRecord;
  benchSettings(row: Row): BenchSettings;
  /** With the owner columns (owner_id … owner_heartbeat_ms): the run's recorded owner, or null. */
  runSummary(row: Row): StoredRunSummary;
  /** A runs row joined with its plan (plan_json), build label, design name and offline periods (offline_json, a JSON array of {from, to}). */
  storedRun(row: Row): StoredRun;
}

export function rowMapping(read: ColumnReading): RowMapping {
  const jsonOrNull = (value: unknown) => (value === null || value === undefined ? null : read.json(value));
  const runSummary = (row: Row): StoredRunSummary => ({
    id: row.id as number,
    uid: row.uid as string,
    buildId: row.build_id as number,
    buildLabel: row.build_label as string,
    designName: row.design_name as string,
    kind: row.kind as RunSummary['kind'],
    status: row.status as RunStatus,
    startedAt: (row.started_at as string | null) ?? null,
    endedAt: (row.ended_at as string | null) ?? null,
    pointCount: row.point_count as number,
    plannedCount: row.planned_count as number,
    simulated: read.flag(row.simulated),
    benchName: (row.bench_name as string | null) ?? '',
    owner: ownershipFromRow(row, read.ownerTimeToLocalMs) ?? null,
  });
  return {
    design: (row) => ({ id: row.id as number, uid: row.uid as string, name: row.name as string, design: read.json(row.design_json), createdAt: row.created_at as string }),
    build: (row) => ({
      id: row.id as number,
      uid: row.uid as string,
      designId: row.design_id as number,
      label: row.label as string,
      notes: row.notes as string,
      actualValues: read.json(row.actual_values_json) as BuildRecord['actualValues'],
      createdAt: row.created_at as string,
    }),
    instrument: (row) => ({
      id: row.id as number,
      role: row.role as InstrumentRecord['role'],
      identity: read.json(row.identity_json) as InstrumentRecord['identity'],
      address: row.address as string,
      firstSeenAt: row.first_seen_at as string,
      lastSeenAt: row.last_seen_at as string,
    }),
    calibration: (row) => ({
      id: row.id as number,
      instrumentPairKey: row.bench_key as string, // the column keeps its first name
      bench: read.json(row.bench_json) as CalibrationRecord['bench'],
      frequencyHz: read.json(row.frequencies_hz_json) as number[],
      gainDb: read.json(row.gain_db_json) as number[],
      phaseDeg: read.json(row.phase_deg_json) as number[],
      notes: row.notes as string,
      createdAt: row.created_at as string,
    }),
    schedule: (row) => ({
      id: row.id as number,
      buildId: row.build_id as number,
      request: read.json(row.request_json) as ScheduleRecord['request'],
      everyMinutes: row.every_minutes as number,
      count: (row.run_count as number | null) ?? null,
      until: (row.until_at as string | null) ?? null,
      createdAt: row.created_at as string,
    }),
    benchSettings: (row) => ({ benchKey: row.bench_key as string, maxStimulusVpp: (row.max_stimulus_vpp as number | null) ?? null, updatedAt: row.updated_at as string }),
    runSummary,
    // The kind, request and plan were checked to belong together when the run was created (checkRunKind).
    storedRun: (row) => ({
      ...runSummary(row),
      request: read.json(row.request_json),
      plan: read.json(row.plan_json),
      softwareVersion: row.software_version as string,
      bench: read.json(row.bench_json) as StoredRun['bench'],
      operator: row.operator as string,
      notes: row.notes as string,
      scheduleId: (row.schedule_id as number | null) ?? null,
      createdAt: row.created_at as string,
      figures: jsonOrNull(row.figures_json) as StoredRun['figures'],
      verdict: jsonOrNull(row.verdict_json) as StoredRun['verdict'],
      // Instants as the stores write them everywhere else: ISO 8601 UTC with milliseconds.
      offlinePeriods: ((jsonOrNull(row.offline_json) as OfflinePeriod[] | null) ?? []).map((period) => ({
        from: new Date(Date.parse(period.from)).toISOString(),
        to: new Date(Date.parse(period.to)).toISOString(),
      })),
    }) as StoredRun,
  };
}

/** The owner columns of a runs row (owner_id … owner_heartbeat_ms), or undefined when nobody drives the run. */
export function ownershipFromRow(row: Row, toLocalMs: (storedMs: number) => number = (ms) => ms): RunOwnership | undefined {
  if (row.owner_id === null || row.owner_id === undefined) return undefined;
  return {
    ownerId: String(row.owner_id),
    pid: Number(row.owner_pid),
    host: String(row.owner_host),
    label: String(row.owner_label),
    since: new Date(toLocalMs(Number(row.owner_since_ms))).toISOString(),
    heartbeatAt: new Date(toLocalMs(Number(row.owner_heartbeat_ms))).toISOString(),
  };
}

/** A points row (both stores' column names, the time as epoch milliseconds in measured_at_ms) as a StoredPoint, for exportRun. */
export function storedPointFromRow(row: Row): StoredPoint {
  return {
    step: row.step as number,
    stimulus: row.stimulus as number,
    amplitudeVpp: row.amplitude_vpp as number,
    inputReading: numberOrNaN(row.input_reading),
    outputReading: numberOrNaN(row.output_reading),
    gainDb: numberOrNaN(row.gain_db),
    gainUncertaintyDb: numberOrNaN(row.gain_u_db),
    phaseDeg: numberOrNaN(row.phase_deg),
    phaseUncertaintyDeg: numberOrNaN(row.phase_u_deg),
    outputV: numberOrNaN(row.output_v),
    flags: row.flags as number,
    measuredAt: new Date(Math.round(row.measured_at_ms as number)).toISOString(),
  };
}

/**
 * The columns both stores select for loadPoints, in this order, one array per
 * row: step, stimulus, amplitude_vpp, gain_db, gain_u_db, phase_deg,
 * phase_u_deg, output_v, flags, and the measuring time as UTC milliseconds.
 */
export function pointColumnsFromRows(rows: readonly unknown[][]): PointColumns {
  const n = rows.length;
  const columns: PointColumns = {
    step: new Array<number>(n),
    stimulus: new Array<number>(n),
    amplitudeVpp: new Array<number>(n),
    gainDb: new Array<number>(n),
    gainUncertaintyDb: new Array<number>(n),
    phaseDeg: new Array<number>(n),
    phaseUncertaintyDeg: new Array<number>(n),
    outputV: new Array<number>(n),
    flags: new Array<number>(n),
    measuredAt: new Array<string>(n),
  };
  for (let i = 0; i < n; i++) {
    const row = rows[i];
    columns.step[i] = row[0] as number;
    columns.stimulus[i] = row[1] as number;
    columns.amplitudeVpp[i] = row[2] as number;
    columns.gainDb[i] = numberOrNaN(row[3]);
    columns.gainUncertaintyDb[i] = numberOrNaN(row[4]);
    columns.phaseDeg[i] = numberOrNaN(row[5]);
    columns.phaseUncertaintyDeg[i] = numberOrNaN(row[6]);
    columns.outputV[i] = numberOrNaN(row[7]);
    columns.flags[i] = row[8] as number;
    // PostgreSQL's epoch extract is a float; SQLite's stored milliseconds are whole already.
    columns.measuredAt[i] = new Date(Math.round(row[9] as number)).toISOString();
  }
  return columns;
}

/**
 * The columns both stores select for loadNoiseRecords, in this order, one array
 * per row: step, sample_rate_hz, segments, degrees_of_freedom, rms_v, mean_v,
 * flags, the measuring time as UTC milliseconds, and the PSD bytes
 * (little-endian doubles, or NULL for a meter reading).
 */
export function noiseRecordsFromRows(rows: readonly unknown[][]): StoredNoiseRecords {
  const n = rows.length;
  const records: StoredNoiseRecords = {
    step: new Array<number>(n),
    sampleRateHz: new Array<number>(n),
    segments: new Array<number>(n),
    degreesOfFreedom: new Array<number>(n),
    rmsV: new Array<number>(n),
    meanV: new Array<number>(n),
    flags: new Array<number>(n),
    measuredAt: new Array<string>(n),
    psdV2PerHz: new Array<Float64Array | null>(n),
  };
  for (let i = 0; i < n; i++) {
    const row = rows[i];
    records.step[i] = Number(row[0]);
    records.sampleRateHz[i] = numberOrNaN(row[1]);
    records.segments[i] = Number(row[2]);
    records.degreesOfFreedom[i] = Number(row[3]);
    records.rmsV[i] = numberOrNaN(row[4]);
    records.meanV[i] = numberOrNaN(row[5]);
    records.flags[i] = Number(row[6]);
    records.measuredAt[i] = new Date(Math.round(Number(row[7]))).toISOString();
    records.psdV2PerHz[i] = row[8] === null || row[8] === undefined ? null : float64FromBytes(row[8] as Uint8Array);
  }
  return records;
}

/** The stored PSD bytes back as doubles (little-endian, as float64Bytes in record-checks.ts writes them). */
export function float64FromBytes(bytes: Uint8Array): Float64Array {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const values = new Float64Array(Math.floor(bytes.byteLength / 8));
  for (let i = 0; i < values.length; i++) values[i] = view.getFloat64(i * 8, true);
  return values;
}

/**
 * A point's values after run_id, in the points table's column order (step,
 * stimulus, amplitude_vpp, input_reading, output_reading, gain_db, gain_u_db,
 * phase_deg, phase_u_deg, output_v, flags, measured time), missing values as
 * NULL. The measured time is given in the store's own form (SQLite: UTC
 * milliseconds; PostgreSQL: an ISO instant for timestamptz).
 */
export function pointValues(point: NewPoint, measuredAt: number | string): unknown[] {
  return [
    point.step,
    point.stimulus,
    point.amplitudeVpp,
    nullable(point.inputReading),
    nullable(point.outputReading),
    nullable(point.gainDb),
    nullable(point.gainUncertaintyDb),
    nullable(point.phaseDeg),
    nullable(point.phaseUncertaintyDeg),
    nullable(point.outputV),
    point.flags,
    measuredAt,
  ];
}

/** NaN (a missing value) is stored as NULL and read back as NaN. */
export function nullable(value: number | undefined): number | null {
  return value === undefined || Number.isNaN(value) ? null : value;
}

export function numberOrNaN(value: unknown): number {
  return value === null || value === undefined ? Number.NaN : (value as number);
}
