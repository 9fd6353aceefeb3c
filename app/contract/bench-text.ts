/**
 * How a bench and its maximum stimulus are named to people. The CLI and the
 * window say the same words, so these live beside the contract (pure).
 */
import type { BenchIdentity, StimulusLimit } from './contract';

/** 'bench "lab-3"' or 'the simulated bench of "lab-3"'. */
export function benchDescription(bench: BenchIdentity): string {
  return bench.simulated ? `the simulated bench of "${bench.name}"` : `bench "${bench.name}"`;
}

/** An ISO 8601 instant as "2026-03-04 05:06:07 UTC" (any offset given is converted). */
export function instantText(iso: string): string {
  const ms = Date.parse(iso);
  if (Number.isNaN(ms)) return iso;
  return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/** "reusing the limit of 2 Vpp set on 2026-03-04 05:06:07 UTC for bench "lab-3"". */
export function limitReuseText(limit: StimulusLimit): string {
  return `reusing the limit of ${limit.maxStimulusVpp} Vpp set on ${instantText(limit.setAt)} for ${benchDescription(limit.bench)}`;
}

/** Where the limit in force comes from, as one line: reused, or set now for this bench. */
export function limitSourceText(limit: StimulusLimit): string {
  return limit.reused ? limitReuseText(limit) : `${limit.maxStimulusVpp} Vpp, set on ${instantText(limit.setAt)} for ${benchDescription(limit.bench)}`;
}
