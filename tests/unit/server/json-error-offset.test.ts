import { expect, test } from 'vitest';
import { jsonErrorOffset } from '../../../server/json-error-offset.js';

// Expected offsets follow the JSON grammar of RFC 8259, counted by hand.
test.each([
  ['{"a": 1}', -1],
  ['[1, 2.5e3, -0, true, null, "x\\u00e9"]', -1],
  ['{"a": }', 6],
  ['{"a" 1}', 5],
  ['[1, 2,]', 6],
  ['{"a": 01}', 7],
  ['"tab\there"', 4],
  ['{"a": 1} x', 9],
  ['', 0],
  ['{"a": [1, 2}', 11],
])('%j -> offset %i', (text, offset) => {
  expect(jsonErrorOffset(text)).toBe(offset);
  // whatever the scanner accepts, JSON.parse accepts too
  if (offset === -1) expect(() => JSON.parse(text)).not.toThrow();
  else expect(() => JSON.parse(text)).toThrow();
});
