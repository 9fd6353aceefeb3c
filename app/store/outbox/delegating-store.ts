/**
 * A RolloffStore that hands every call to another one: the base of a store that
 * changes a few methods (the outbox) and keeps the rest exactly as they were.
 */
import type { RolloffStore } from '../store-interface';

type Inner = RolloffStore;

export class DelegatingStore implements RolloffStore {
  constructor(protected readonly inner: Inner) {
    if (inner.watchChanges) this.watchChanges = (listener, options) => inner.watchChanges!(listener, options);
  }

  get location(): string { return this.inner.location; }
  get readonly(): boolean { return this.inner.readonly; }
  get appliedMigrations(): readonly number[] { return this.inner.appliedMigrations; }

  watchChanges?: Inner['watchChanges'];
  saveDesign: Inner['saveDesign'] = (...a) => this.inner.saveDesign(...a);
  getDesign: Inner['getDesign'] = (...a) => this.inner.getDesign(...a);
  listDesigns: Inner['listDesigns'] = (...a) => this.inner.listDesigns(...a);
  createBuild: Inner['createBuild'] = (...a) => this.inner.createBuild(...a);
  getBuild: Inner['getBuild'] = (...a) => this.inner.getBuild(...a);
  listBuilds: Inner['listBuilds'] = (...a) => this.inner.listBuilds(...a);
  createRun: Inner['createRun'] = (...a) => this.inner.createRun(...a);
  createRuns: Inner['createRuns'] = (...a) => this.inner.createRuns(...a);
  createOwnedRun: Inner['createOwnedRun'] = (...a) => this.inner.createOwnedRun(...a);
  updateRunStatus: Inner['updateRunStatus'] = (...a) => this.inner.updateRunStatus(...a);
  setRunResults: Inner['setRunResults'] = (...a) => this.inner.setRunResults(...a);
  getRun: Inner['getRun'] = (...a) => this.inner.getRun(...a);
  listRuns: Inner['listRuns'] = (...a) => this.inner.listRuns(...a);
  findInterruptedRuns: Inner['findInterruptedRuns'] = (...a) => this.inner.findInterruptedRuns(...a);
  claimRun: Inner['claimRun'] = (...a) => this.inner.claimRun(...a);
  claimRunOnFreeBench: Inner['claimRunOnFreeBench'] = (...a) => this.inner.claimRunOnFreeBench(...a);
  renewRunHeartbeat: Inner['renewRunHeartbeat'] = (...a) => this.inner.renewRunHeartbeat(...a);
  releaseRun: Inner['releaseRun'] = (...a) => this.inner.releaseRun(...a);
  getRunOwnership: Inner['getRunOwnership'] = (...a) => this.inner.getRunOwnership(...a);
  recordOfflinePeriod: Inner['recordOfflinePeriod'] = (...a) => this.inner.recordOfflinePeriod(...a);
  insertPoint: Inner['insertPoint'] = (...a) => this.inner.insertPoint(...a);
  insertPoints: Inner['insertPoints'] = (...a) => this.inner.insertPoints(...a);
  insertPointsOfRuns: Inner['insertPointsOfRuns'] = (...a) => this.inner.insertPointsOfRuns(...a);
  loadPoints: Inner['loadPoints'] = (...a) => this.inner.loadPoints(...a);
  nextStep: Inner['nextStep'] = (...a) => this.inner.nextStep(...a);
  insertNoiseRecord: Inner['insertNoiseRecord'] = (...a) => this.inner.insertNoiseRecord(...a);
  loadNoiseRecords: Inner['loadNoiseRecords'] = (...a) => this.inner.loadNoiseRecords(...a);
  appendEvent: Inner['appendEvent'] = (...a) => this.inner.appendEvent(...a);
  listEvents: Inner['listEvents'] = (...a) => this.inner.listEvents(...a);
  saveCalibration: Inner['saveCalibration'] = (...a) => this.inner.saveCalibration(...a);
  latestCalibration: Inner['latestCalibration'] = (...a) => this.inner.latestCalibration(...a);
  createSchedule: Inner['createSchedule'] = (...a) => this.inner.createSchedule(...a);
  getSchedule: Inner['getSchedule'] = (...a) => this.inner.getSchedule(...a);
  recordInstrument: Inner['recordInstrument'] = (...a) => this.inner.recordInstrument(...a);
  listInstruments: Inner['listInstruments'] = (...a) => this.inner.listInstruments(...a);
  getBenchSettings: Inner['getBenchSettings'] = (...a) => this.inner.getBenchSettings(...a);
  saveBenchSettings: Inner['saveBenchSettings'] = (...a) => this.inner.saveBenchSettings(...a);
  idsOfUids: Inner['idsOfUids'] = (...a) => this.inner.idsOfUids(...a);
  exportRun: Inner['exportRun'] = (...a) => this.inner.exportRun(...a);
  importDesign: Inner['importDesign'] = (...a) => this.inner.importDesign(...a);
  importBuild: Inner['importBuild'] = (...a) => this.inner.importBuild(...a);
  importSchedule: Inner['importSchedule'] = (...a) => this.inner.importSchedule(...a);
  importRuns: Inner['importRuns'] = (...a) => this.inner.importRuns(...a);
  schemaVersion: Inner['schemaVersion'] = (...a) => this.inner.schemaVersion(...a);
  integrityProblems: Inner['integrityProblems'] = (...a) => this.inner.integrityProblems(...a);
  close: Inner['close'] = (...a) => this.inner.close(...a);
}
