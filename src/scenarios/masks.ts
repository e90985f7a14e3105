/**
 * Stability masks shipped with syncring, by name (file name without ".json"). There is one, and
 * it is invented for the demo: syncring ships no mask from any standard.
 */
import inventedDemoTdevMask from './invented-demo-tdev-mask.json' with { type: 'json' };

const MASK_BY_NAME: ReadonlyMap<string, unknown> = new Map<string, unknown>([['invented-demo-tdev-mask', inventedDemoTdevMask]]);

export const builtInMaskNames: string[] = [...MASK_BY_NAME.keys()];

/** A fresh copy of a built-in mask's raw JSON (validate it with parseMask). */
export function builtInMaskRaw(name: string): unknown {
  const raw = MASK_BY_NAME.get(name);
  if (raw === undefined) throw new Error(`unknown built-in mask ${JSON.stringify(name)}; available: ${builtInMaskNames.join(', ')}`);
  return structuredClone(raw);
}
