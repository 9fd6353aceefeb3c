/** The circuit of a stored design, and of a build of it (its measured part values substituted). */
import { type Design, parseDesign, withActualValues } from '../circuit';
import type { BuildRecord, DesignRecord } from '../contract/contract';

export function designOf(record: Pick<DesignRecord, 'id' | 'name' | 'design'> & Partial<DesignRecord>): Design {
  return parseDesign(record.design, `design ${record.id} (${record.name})`);
}

/** The design with the build's measured part values substituted. */
export function buildDesign(design: DesignRecord, build: BuildRecord): Design {
  return withActualValues(designOf(design), build.actualValues);
}
