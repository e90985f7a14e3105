/**
 * Largest (max - min) over all windows of `width` consecutive samples, in O(N) whatever the
 * width: two monotonic deques of indices (ring buffers of `width` slots) hold the candidates for
 * the window maximum and minimum, and each index enters and leaves each deque once.
 * Input must be validated and hold at least `width` samples.
 */
export function largestWindowRange(values: ArrayLike<number>, width: number): number {
  const highs = new Int32Array(width);
  const lows = new Int32Array(width);
  // Deque = slots head .. tail - 1 (mod width); count tracks fullness.
  let highHead = 0;
  let highCount = 0;
  let lowHead = 0;
  let lowCount = 0;
  let largest = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const oldest = i - width + 1;
    // Drop the candidate that left the window, then those the new sample dominates.
    if (highCount > 0 && highs[highHead] < oldest) {
      highHead = highHead + 1 === width ? 0 : highHead + 1;
      highCount--;
    }
    while (highCount > 0 && values[highs[slot(highHead, highCount - 1, width)]] <= v) highCount--;
    highs[slot(highHead, highCount, width)] = i;
    highCount++;
    if (lowCount > 0 && lows[lowHead] < oldest) {
      lowHead = lowHead + 1 === width ? 0 : lowHead + 1;
      lowCount--;
    }
    while (lowCount > 0 && values[lows[slot(lowHead, lowCount - 1, width)]] >= v) lowCount--;
    lows[slot(lowHead, lowCount, width)] = i;
    lowCount++;
    if (oldest >= 0) {
      const range = values[highs[highHead]] - values[lows[lowHead]];
      if (range > largest) largest = range;
    }
  }
  return largest;
}

/** Ring-buffer slot `offset` places after `head` (offset < width), without a division. */
function slot(head: number, offset: number, width: number): number {
  const s = head + offset;
  return s >= width ? s - width : s;
}
