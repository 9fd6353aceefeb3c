/**
 * The conformance suite can fail: each deliberately broken store fails the
 * checks of the guarantee it breaks, while the same wrapper around a correct
 * store passes every check.
 */
import { describe, expect, it } from 'vitest';
import { STORE_CONFORMANCE_CHECKS, failingChecks } from './store-conformance';
import { checksBenchThenCreates, claimsThenChecksBench, ignoresOwnerConditionOnEvents, ignoresOwnerConditionOnNoiseRecords, resumesWithoutBenchCheck, dropsStepOrder, halfAppliesBatches, ignoresOwnerCondition, roundsNoiseSpectra, storesPointTwice, unbrokenStore } from './broken-stores';

const names = STORE_CONFORMANCE_CHECKS.map((check) => check.name);
const ROUND_TRIP = names[0];
const STEP_ORDER = names[1];
const DUPLICATE = names[2];
const BULK = names[3];
const BENCH_RESERVATION = names.find((name) => name.startsWith('bench reservation:'))!;
const RESUME_RESERVATION = names.find((name) => name.startsWith('bench reservation on resume'))!;
const OWNER_WRITES = names.find((name) => name.startsWith("run ownership: an owner's status and point writes"))!;
const OWNER_EVENTS = names.find((name) => name.startsWith("run ownership: an owner's event lines"))!;
const NOISE_OWNER_WRITES = names.find((name) => name.startsWith("run ownership: an owner's noise records"))!;
const NOISE_ROUND_TRIP = names.find((name) => name.startsWith('stores a noise run'))!;

describe('the store conformance suite fails broken stores', () => {
  it('passes a correct store behind the same wrapper (the wrapper alone breaks nothing)', async () => {
    expect(await failingChecks(unbrokenStore)).toEqual([]);
  });

  it('fails a store that stores a point twice', async () => {
    expect(await failingChecks(storesPointTwice)).toEqual([DUPLICATE]);
  });

  it('fails a store that loses the step order', async () => {
    const failed = await failingChecks(dropsStepOrder);
    expect(failed).toContain(ROUND_TRIP);
    expect(failed).toContain(STEP_ORDER);
  });

  it('fails a store that writes for an owner that lost the run', async () => {
    expect(OWNER_WRITES).toBeDefined();
    expect(await failingChecks(ignoresOwnerCondition)).toEqual([OWNER_WRITES]);
  });

  it('fails a store that stores noise records for an owner that lost the run', async () => {
    expect(NOISE_OWNER_WRITES).toBeDefined();
    expect(await failingChecks(ignoresOwnerConditionOnNoiseRecords)).toEqual([NOISE_OWNER_WRITES]);
  });

  it('fails a store that keeps noise spectra less exactly than measured', async () => {
    expect(await failingChecks(roundsNoiseSpectra)).toEqual([NOISE_ROUND_TRIP]);
  });

  it('fails a store that applies half a batch', async () => {
    const failed = await failingChecks(halfAppliesBatches);
    expect(failed).toContain(DUPLICATE);
    expect(failed).toContain(BULK);
  });

  it('fails a store whose start checks the bench and creates the run in separate steps', async () => {
    expect(await failingChecks(checksBenchThenCreates)).toEqual([BENCH_RESERVATION]);
  });

  it('fails a store whose resume claim does not check the bench', async () => {
    expect(RESUME_RESERVATION).toBeDefined();
    expect(await failingChecks(resumesWithoutBenchCheck)).toEqual([RESUME_RESERVATION]);
  });

  it('fails a store whose resume claims the run and checks the bench in separate steps', async () => {
    expect(await failingChecks(claimsThenChecksBench)).toEqual([RESUME_RESERVATION]);
  });

  it('fails a store that adds event lines for an owner that lost the run', async () => {
    expect(OWNER_EVENTS).toBeDefined();
    expect(await failingChecks(ignoresOwnerConditionOnEvents)).toEqual([OWNER_EVENTS]);
  });
});
