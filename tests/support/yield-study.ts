import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { adlerPairScenario } from './adler-pair.js';

/**
 * A small yield study for the command-line and queue tests: an Adler pair with a normal detuning
 * spread about the size of its locking range, so about half the boards lock, plus two boards
 * confirmed with the full system. Tens of milliseconds a sample.
 */
export function writeAdlerStudy(dir: string, samples = 48, change: Record<string, unknown> = {}): string {
  const path = join(dir, 'study.json');
  writeFileSync(
    path,
    JSON.stringify({
      name: 'Adler pair yield (test)',
      scenario: adlerPairScenario(0.01, 0.05),
      samples,
      seed: 5,
      tolerances: [{ parameter: 'detuning', nodes: 'all', distribution: 'normal', sigma: 0.04 }],
      start: 'random',
      criteria: { pattern: 'in-phase', mode: 0, within: 300, minMargin: null },
      confirm: { fullSystem: 2 },
      ...change,
    }),
  );
  return path;
}

/** samples.ndjson's lines sorted by index: the engines' output, compared across runs. */
export function sortedSampleLines(text: string): string[] {
  return text
    .split('\n')
    .filter((line) => line.trim() !== '')
    .sort((a, b) => (JSON.parse(a) as { index: number }).index - (JSON.parse(b) as { index: number }).index);
}
