/**
 * Input checks shared by the stability functions. Every message starts with the public function
 * that was called and names the offending argument or sample.
 */

export function requireSeries(where: string, name: string, values: ArrayLike<number>, minLength: number): void {
  if (values === null || typeof values !== 'object' || typeof values.length !== 'number') {
    throw new TypeError(`${where}: ${name} must be an array of numbers, got ${describeValue(values)}`);
  }
  if (values.length < minLength) {
    throw new RangeError(`${where}: ${name} has ${values.length} samples; at least ${minLength} are needed`);
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new RangeError(`${where}: ${name}[${i}] is ${describeValue(v)}; samples must be finite numbers`);
    }
  }
}

export function requireSampleInterval(where: string, tau0: number): void {
  if (typeof tau0 !== 'number' || !Number.isFinite(tau0) || tau0 <= 0) {
    throw new RangeError(`${where}: tau0 must be a finite number > 0 (seconds), got ${describeValue(tau0)}`);
  }
}

export function requireAveragingFactor(where: string, m: number): void {
  if (typeof m !== 'number' || !Number.isSafeInteger(m) || m < 1) {
    throw new RangeError(`${where}: averaging factor m must be an integer >= 1, got ${describeValue(m)}`);
  }
}

/** Fails when the phase series is too short for averaging factor m. */
export function requirePhasePoints(where: string, m: number, have: number, need: number): void {
  if (have < need) {
    throw new RangeError(
      `${where}: averaging factor m = ${m} needs at least ${need} phase points ` +
        `(${need - 1} frequency samples); the series gives ${have}`,
    );
  }
}

export function describeValue(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  return typeof value;
}
