/**
 * The 1000-point test set of NIST SP 1065 (W. J. Riley, Handbook of Frequency Stability Analysis,
 * 2008) by its published generator: n_0 = 1234567890, n_{i+1} = 16807 n_i mod (2^31 - 1), value
 * n_i / (2^31 - 1). The product stays below 2^53, so it is exact in doubles.
 */
export function nistTestSet(count = 1000): Float64Array {
  const modulus = 2147483647;
  const values = new Float64Array(count);
  let n = 1234567890;
  for (let i = 0; i < count; i++) {
    values[i] = n / modulus;
    n = (16807 * n) % modulus;
  }
  return values;
}
