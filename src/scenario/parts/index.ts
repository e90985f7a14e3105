/** The parts layer: a board described by its crystal, sustaining circuit, unwanted mode and coupling. */
export { parseParts, PARTS_FIELDS } from './parse-parts.js';
export { deriveModel, MARGIN_RULE_LOW, MARGIN_RULE_HIGH, DRIVE_LEVEL_CEILING_W, type DerivedModel } from './derive.js';
export { DERIVATION, type DerivationStep } from './derivation-steps.js';
export * from './crystal.js';
export type * from './types.js';
