import { execFile } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { adlerPairScenario } from './adler-pair.js';

const root = new URL('../../', import.meta.url).pathname;
const bin = join(root, 'bin/syncring.js');

/**
 * A two-node soak that passes, run through the CLI (`syncring soak`, compiled dist/): the pair
 * of adler-pair.ts, one fault at half the locking limit (Delta_0 = 0.025 = kappa sigma / 2;
 * Adler, Proc. IRE 34, 1946: locked while |dw| <= K), applied once the pair has locked (a short
 * lock window, 5 slow units). Runs in about a second. The scenario gives no nominal frequency
 * unless `nominalFrequencyHz` is passed; `uncoupledReference` adds the uncoupled twin (and with
 * it the single-part stability series); `stability` adds fields to the campaign's stability
 * section (a mask, mustMeetMask).
 */
export function runPairSoak(
  dir: string,
  out: string,
  options: { uncoupledReference?: boolean; nominalFrequencyHz?: number; stability?: Record<string, unknown> } = {},
): Promise<{ code: number; stdout: string; stderr: string }> {
  const scenario = join(dir, 'pair.json');
  const given = options.nominalFrequencyHz === undefined ? {} : { nominalFrequencyHz: options.nominalFrequencyHz };
  writeFileSync(scenario, JSON.stringify({ ...adlerPairScenario(), ...given }));
  const campaign = join(dir, 'campaign.json');
  writeFileSync(
    campaign,
    JSON.stringify({
      name: 'half the locking limit',
      detector: { lockWindow: 5 },
      faults: [{ id: 'half-limit', start: 2000, action: 'set-detuning', params: { node: 0, delta: 0.025 }, duration: 1500 }],
      stability: { uncoupledReference: options.uncoupledReference ?? false, ...options.stability },
    }),
  );
  return new Promise((resolve) => {
    execFile(
      'node',
      [bin, 'soak', scenario, '--campaign', campaign, '--until', '6000', '--out', out],
      { cwd: root, timeout: 60_000 },
      (error, stdout, stderr) => resolve({ code: error ? ((error as { code?: number }).code ?? -1) : 0, stdout, stderr }),
    );
  });
}
