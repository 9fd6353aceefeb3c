/**
 * The design model: a circuit as drawn. A parsed Design is also a valid design
 * file (values are plain numbers in SI units), so it round-trips through JSON.
 * The types are inferred from the design-file schema (design-schema.ts), where
 * each field is described with its unit.
 */
export type { Design, Part, PartType, PassivePart, DiodePart, OpAmpPart, DiodeModel, OpAmpModel } from './design-schema';
export { isGroundNode } from './design-schema';
