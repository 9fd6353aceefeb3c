/**
 * The window's check of what the host sends back (app/contract/check-reply.ts):
 * one schema per method (API_RESULTS) and per event (SERVICE_EVENT_SCHEMAS),
 * refusals that name the method or event, the field, what was expected and
 * what arrived, with the version hint. The accepted forms of numbers follow
 * the two transports: JSON.stringify writes NaN and ±Infinity as null
 * (ECMA-262, JSON.stringify's SerializeJSONProperty), and structured clone,
 * which Electron's IPC uses, keeps them (HTML Standard, StructuredSerialize).
 * Run data: the record tests' invented fixtures (test/unit/record/fixtures.ts).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { UnexpectedReplyError } from '../../../app/errors';
import { API_RESULTS, SERVICE_EVENT_NAMES, SERVICE_EVENT_SCHEMAS, type RunSummary } from '../../../app/contract/contract';
import { checkEvent, checkResult, REPLY_MISMATCH_HINT } from '../../../app/contract/check-reply';
import { API_METHOD_NAMES } from '../../../app/contract/check-call';
import { acRunDetail, comparisonFixture } from '../record/fixtures';
import { refusalOf } from '../../helpers/refusal';

const SUMMARY: RunSummary = {
  id: 12, uid: '9a3e2c71-4b8d-4f60-a1c5-000000000012', buildId: 3, buildLabel: 'Board A', designName: 'Inverting low-pass', kind: 'ac',
  status: 'done', startedAt: '2026-11-30T10:00:00.000Z', endedAt: '2026-11-30T10:04:31.500Z', pointCount: 41, plannedCount: 41,
  simulated: true, benchName: 'simulated bench 1', owner: null,
};

/** What the web host sends: the reply through JSON. */
const overJson = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

describe('API_RESULTS and SERVICE_EVENT_SCHEMAS', () => {
  it('have one schema per method of the contract and one per event name', () => {
    // The methods declared in RolloffApi, read from the contract's source, as the call check's test does.
    const source = readFileSync(resolve(__dirname, '../../../app/contract/contract.ts'), 'utf8');
    const body = /export interface RolloffApi \{([\s\S]*?)\n\}/.exec(source)![1];
    const declared = [...body.matchAll(/^\s+(\w+)\(/gm)].map((m) => m[1]).sort();
    expect(Object.keys(API_RESULTS).sort()).toEqual(declared);
    expect(Object.keys(API_RESULTS).sort()).toEqual([...API_METHOD_NAMES].sort());
    expect(Object.keys(SERVICE_EVENT_SCHEMAS).sort()).toEqual([...SERVICE_EVENT_NAMES].sort());
  });
});

describe('checkResult', () => {
  it('hands a fitting result on unchanged, the very object that arrived', () => {
    const detail = acRunDetail({ overrangeIndex: 4 });
    expect(checkResult('getRun', detail)).toBe(detail);
    const list = [SUMMARY, { ...SUMMARY, id: 13, status: 'running' }];
    expect(checkResult('listRuns', list)).toBe(list);
  });

  it('refuses a summary whose status is not a run state, naming the method, the index and the field', () => {
    const error = refusalOf(UnexpectedReplyError, () => checkResult('listRuns', [SUMMARY, { ...SUMMARY, status: 'exploded' }]));
    expect(error.where).toBe('listRuns() result[1].status');
    expect(error.message).toBe('listRuns() result[1].status: must be one of planned, running, paused, done, stopped, failed, got "exploded"');
    expect(error.hint).toBe(REPLY_MISMATCH_HINT);
    expect(error.hint).toMatch(/different versions/);
    expect(error.hint).toMatch(/host is faulty/);
  });

  it('refuses a detail whose gain column holds text, at the element', () => {
    const detail = overJson(acRunDetail());
    (detail.points.gainDb as unknown[])[7] = '-3.1';
    const error = refusalOf(UnexpectedReplyError, () => checkResult('getRun', detail));
    expect(error.where).toBe('getRun() result.points.gainDb[7]');
    expect(error.message).toMatch(/must be a number \(null where it has none\), got "-3\.1"$/);
  });

  it('refuses a missing field with its own message at its own path', () => {
    const { theory: _theory, ...withoutTheory } = acRunDetail();
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRun', withoutTheory)).message).toBe('getRun() result.theory: must be an object, got undefined');
    const { uid: _uid, ...withoutUid } = SUMMARY;
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRunSummary', withoutUid)).message).toBe('getRunSummary() result.uid: must be text, got undefined');
  });

  it('refuses a reply of the wrong kind altogether', () => {
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRun', null)).message).toBe('getRun() result: must be an object, got null');
    expect(refusalOf(UnexpectedReplyError, () => checkResult('listRuns', SUMMARY)).message).toBe('listRuns() result: must be a list, got an object');
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRun', { ...acRunDetail(), kind: 'noise' })).where).toBe('getRun() result.kind');
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRunSummary', { ...SUMMARY, pointCount: 2.5 })).message).toMatch(/pointCount: must be a whole number from 0, got 2\.5$/);
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRunSummary', { ...SUMMARY, owner: 'pid 7' })).where).toBe('getRunSummary() result.owner');
  });

  it("checks a run's echoed request with the request's own schema, the recorded maximum stimulus included", () => {
    const detail = acRunDetail();
    expect(checkResult('getRun', { ...detail, request: { ...detail.request, maxStimulusVpp: 1 } })).toBeDefined();
    const zeroLimit = refusalOf(UnexpectedReplyError, () => checkResult('getRun', { ...detail, request: { ...detail.request, maxStimulusVpp: 0 } }));
    expect(zeroLimit.where).toBe('getRun() result.request.maxStimulusVpp');
    const badAmplitude = refusalOf(UnexpectedReplyError, () => checkResult('getRun', { ...detail, request: { ...detail.request, amplitude: { mode: 'fixed', vpp: -1 } } }));
    expect(badAmplitude.where).toBe('getRun() result.request.amplitude.vpp');
    // The hint is the reply's, not the one the request schema gives a caller.
    expect(badAmplitude.hint).toBe(REPLY_MISMATCH_HINT);
  });

  it('takes NaN and ±Infinity as IPC carries them, and null as JSON carries them, in measured columns and figures', () => {
    const detail = acRunDetail({ overrangeIndex: 4 });
    detail.points.phaseDeg[5] = Number.POSITIVE_INFINITY;
    detail.figures.gbwUncertaintyHz = Number.NaN;
    expect(Number.isNaN(detail.points.gainDb[4])).toBe(true);
    expect(checkResult('getRun', detail)).toBe(detail);
    const json = overJson(detail);
    expect(json.points.gainDb[4]).toBeNull();
    expect(json.points.phaseDeg[5]).toBeNull();
    expect(json.figures.gbwUncertaintyHz).toBeNull();
    expect(checkResult('getRun', json)).toBe(json);
  });

  it('does not take NaN or null where a count or an id belongs', () => {
    const detail = acRunDetail();
    detail.points.flags[3] = Number.NaN;
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRun', detail)).message).toBe('getRun() result.points.flags[3]: must be a whole number from 0, got NaN');
    expect(refusalOf(UnexpectedReplyError, () => checkResult('getRunSummary', { ...SUMMARY, id: null })).where).toBe('getRunSummary() result.id');
  });

  it('lets a field it does not know through (a newer host may add one), and optional fields be absent or undefined', () => {
    const newer = { ...SUMMARY, colour: 'green' };
    expect(checkResult('getRunSummary', newer)).toBe(newer);
    const status = { instruments: [], maxStimulusVpp: 0, bench: undefined };
    expect(checkResult('benchStatus', status)).toBe(status);
    expect(checkResult('benchStatus', overJson(status))).toEqual({ instruments: [], maxStimulusVpp: 0 });
  });

  it('takes null (what both hosts send) for a method that resolves to nothing, and nothing else', () => {
    expect(checkResult('disconnect', null)).toBeNull();
    expect(checkResult('disconnect', undefined)).toBeUndefined();
    expect(refusalOf(UnexpectedReplyError, () => checkResult('disconnect', { ok: true })).message).toBe('disconnect() result: must be nothing (null), got an object');
  });

  it('takes a design file from makeTemplate and refuses anything without a list of parts', () => {
    const design = { name: 'stage', parts: [] };
    expect(checkResult('makeTemplate', design)).toBe(design);
    expect(refusalOf(UnexpectedReplyError, () => checkResult('makeTemplate', { name: 'stage' })).message).toMatch(/^makeTemplate\(\) result: must be a design file/);
  });

  it('checks a comparison, its runs and its figure table', () => {
    const { comparison } = comparisonFixture(12);
    expect(checkResult('compareRuns', overJson(comparison))).toBeDefined();
    const broken = overJson(comparison);
    (broken.figureTable[1].deltas as Record<string, unknown>).gainLimitHz = 'lower';
    expect(refusalOf(UnexpectedReplyError, () => checkResult('compareRuns', broken)).where).toBe('compareRuns() result.figureTable[1].deltas.gainLimitHz');
    const badReference = { ...overJson(comparison), referenceRunId: 'run 12' };
    expect(refusalOf(UnexpectedReplyError, () => checkResult('compareRuns', badReference)).where).toBe('compareRuns() result.referenceRunId');
  });

  it('refuses a method this window does not know', () => {
    const error = refusalOf(UnexpectedReplyError, () => checkResult('dropTables' as never, {}));
    expect(error.message).toMatch(/^dropTables\(\): is not a method this window knows/);
    expect(error.hint).toBe(REPLY_MISMATCH_HINT);
  });
});

describe('checkEvent', () => {
  const POINT = { runId: 12, index: 3, stimulus: 1e3, gainDb: 19.9, phaseDeg: -8.5, outputV: Number.NaN, flags: 0, gainUncertaintyDb: 0.01, phaseUncertaintyDeg: 0.1 };

  it('hands a fitting payload on unchanged, in either transport form', () => {
    expect(checkEvent('point', POINT)).toBe(POINT);
    const json = overJson(POINT);
    expect(json.outputV).toBeNull();
    expect(checkEvent('point', json)).toBe(json);
    const line = { runId: 12, at: '2026-11-30T10:00:00.000Z', level: 'warning', message: 'retried' };
    expect(checkEvent('runEvent', line)).toBe(line);
  });

  it('refuses a point without its run id, naming the event and the field', () => {
    const { runId: _runId, ...withoutRunId } = POINT;
    const error = refusalOf(UnexpectedReplyError, () => checkEvent('point', withoutRunId));
    expect(error.where).toBe('point event.runId');
    expect(error.message).toMatch(/^point event\.runId: must be a finite number, got undefined$/);
    expect(error.hint).toBe(REPLY_MISMATCH_HINT);
  });

  it('refuses a bad payload of every other event at its field', () => {
    expect(refusalOf(UnexpectedReplyError, () => checkEvent('progress', { runId: 1, step: 2, total: 10, etaS: 4, status: 'exploded' })).where).toBe('progress event.status');
    expect(refusalOf(UnexpectedReplyError, () => checkEvent('runEvent', { runId: 1, at: '2026-11-30T10:00:00.000Z', level: 'panic', message: 'x' })).where).toBe('runEvent event.level');
    expect(refusalOf(UnexpectedReplyError, () => checkEvent('traffic', { at: '2026-11-30T10:00:00.000Z', role: 'meter', direction: 'sideways', text: '*IDN?' })).where).toBe('traffic event.direction');
    expect(refusalOf(UnexpectedReplyError, () => checkEvent('bench', { instruments: 'none', maxStimulusVpp: 1 })).where).toBe('bench event.instruments');
  });

  it('refuses an event this window does not know', () => {
    expect(refusalOf(UnexpectedReplyError, () => checkEvent('explosion' as never, {})).message).toMatch(/"explosion" event: is not an event this window knows/);
  });
});
