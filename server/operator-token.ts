import { timingSafeEqual } from 'node:crypto';

/** The operator token check of the WebSocket hub and the HTTP control endpoints: constant time, so its timing gives nothing away. */
export function sameToken(given: string, expected: string): boolean {
  const a = Buffer.from(given);
  const b = Buffer.from(expected);
  return a.length === b.length && timingSafeEqual(a, b);
}
