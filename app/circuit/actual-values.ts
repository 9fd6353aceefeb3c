/**
 * A build's measured part values replace the drawn ones. A measured part is no
 * longer subject to its manufacturing tolerance, so its tolerance is dropped.
 */
import { DesignError } from './design-error';
import type { Design } from './types';

export function withActualValues(design: Design, actualValuesById: Record<string, number>): Design {
  const known = new Map(design.parts.map((p) => [p.id, p]));
  for (const [id, value] of Object.entries(actualValuesById)) {
    const part = known.get(id);
    if (!part) throw new DesignError(`actual values: ${id}`, `the design "${design.name}" has no part "${id}"`, `Parts: ${[...known.keys()].join(', ')}.`, { partId: id });
    if (!('value' in part)) throw new DesignError(`actual values: ${id}`, `${id} is a ${part.type}; only resistors, capacitors and inductors take a measured value`, undefined, { partId: id });
    if (!(typeof value === 'number' && Number.isFinite(value) && value > 0)) {
      throw new DesignError(`actual values: ${id}`, `measured value ${value} must be a positive number in SI units`, undefined, { partId: id });
    }
  }
  return {
    ...design,
    parts: design.parts.map((part) => {
      if (!('value' in part) || actualValuesById[part.id] === undefined) return part;
      const { tolerance: _dropped, ...rest } = part;
      return { ...rest, value: actualValuesById[part.id] };
    }),
  };
}
