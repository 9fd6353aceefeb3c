/**
 * Planning a sweep for the bench in force: the plan's input is the request, the
 * maximum stimulus, the connected generator's limits (the generic profile's
 * before one is connected), the instruments' settling and integration, and the
 * ideal response of the circuit being swept.
 */
import type { Design } from '../circuit';
import { withActualValues, throughDesign } from '../circuit';
import { planSweep, toPlanSummary, type PlanInput } from '../sweep/plan';
import type { SweepPlanSummary, SweepRequest } from '../contract/contract';
import type { RolloffStore } from '../store';
import { designForBuild } from '../read-model/run-detail';
import { designOf } from '../read-model/stored-design';
import { planTheoryFor } from './plan-theory';
import type { BenchControl } from './bench-control';
import type { RolloffServiceOptions } from './service-options';

export class SweepPlanning {
  constructor(
    private readonly store: RolloffStore,
    private readonly bench: Pick<BenchControl, 'generatorLimits' | 'requireMaxStimulus'>,
    private readonly options: Pick<RolloffServiceOptions, 'instrumentSettleS' | 'meterIntegrationS'>,
  ) {}

  async planSweep(request: SweepRequest): Promise<SweepPlanSummary> {
    return toPlanSummary(planSweep(await this.planInput(request, this.bench.requireMaxStimulus())));
  }

  /**
   * The plan for a design file and measured values that are not stored yet:
   * lets a caller refuse a bad request before storing anything.
   */
  planForUnsavedBuild(request: SweepRequest, design: unknown, actualValues: Record<string, number>): SweepPlanSummary {
    const built = withActualValues(designOf({ id: 0, name: '', design, createdAt: '' }), actualValues);
    return toPlanSummary(planSweep(this.planInputFor(request, this.bench.requireMaxStimulus(), request.through ? throughDesign(built) : built)));
  }

  async planInput(request: SweepRequest, maxStimulusVpp: number): Promise<PlanInput> {
    // A through run measures the stage input: plan its amplitude for that node, not the stage output.
    return this.planInputFor(request, maxStimulusVpp, await designForBuild(this.store, request.buildId, request.through));
  }

  planInputFor(request: SweepRequest, maxStimulusVpp: number, design: Design): PlanInput {
    const usesMeter = request.kind === 'dc' || request.measurement === 'meter';
    return {
      request,
      maxStimulusVpp,
      instruments: {
        generator: this.bench.generatorLimits(),
        instrumentSettleS: this.options.instrumentSettleS ?? 0.01,
        minIntegrationS: usesMeter ? (this.options.meterIntegrationS ?? 0.1) : 0,
      },
      theory: planTheoryFor(design),
    };
  }
}
