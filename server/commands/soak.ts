import { runSoak, type SoakOptions } from '../soak/runner.js';
import { UsageError } from '../usage-error.js';
import { PASS_CAUTION } from '../../src/campaign/cautions.js';

/**
 * `syncring soak`: run a campaign headless, print one JSON line (pass with what it means, exit code, counts, the
 * summary's path) and return the exit code: 0 no verdict failed (INCOMPLETE ones are reported
 * beside the pass), 1 a verdict failed (or was INCOMPLETE under --fail-incomplete), 3 the run
 * halted (blow-up); 2 is bad input (an InputError, printed by the CLI).
 */
export async function soak(options: SoakOptions): Promise<number> {
  if (options.pace !== undefined && !(options.pace > 0))
    throw new UsageError(`--pace must be > 0 slow time units per second (got ${options.pace})`);
  if (options.segmentBytes !== undefined && !(options.segmentBytes >= 1024))
    throw new UsageError(`--segment-bytes must be at least 1024 (got ${options.segmentBytes})`);
  if (options.checkpointEvery !== undefined && !(options.checkpointEvery > 0))
    throw new UsageError(`--checkpoint-every must be a positive tau (got ${options.checkpointEvery})`);
  const result = await runSoak(options);
  const s = result.summary as { pass: boolean; tau: number; counts: unknown; status: string };
  process.stdout.write(
    `${JSON.stringify({ pass: s.pass, caution: PASS_CAUTION, exitCode: result.exitCode, status: s.status, tau: s.tau, counts: s.counts, summary: result.summaryPath })}\n`,
  );
  return result.exitCode;
}
