import { existsSync, readFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';
import { chromium, type Browser } from 'playwright-core';

/**
 * Debian's chromium; the browser tests drive it with playwright-core (no bundled browsers).
 * SYNCRING_CHROMIUM points elsewhere (another distribution, or a missing path to check the skip).
 */
export const CHROMIUM_PATH = process.env.SYNCRING_CHROMIUM ?? '/usr/bin/chromium';

export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

/**
 * Whether the browser tests can run. Without chromium they are skipped, loudly; in CI a missing
 * browser is a failure (the caller turns `mustFail` into a failing test), never a silent skip.
 */
export function chromiumAvailability(): { available: boolean; mustFail: boolean } {
  const available = existsSync(CHROMIUM_PATH);
  if (!available) {
    const line = `BROWSER TESTS SKIPPED: ${CHROMIUM_PATH} not found`;
    process.stderr.write(`\n${'!'.repeat(line.length)}\n${line}\n${'!'.repeat(line.length)}\n\n`);
  }
  return { available, mustFail: !available && Boolean(process.env.CI) };
}

export async function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
}

/** "Chromium 156.0..." as the binary reports it, recorded with the test output. */
export function chromiumVersion(): string {
  try {
    return execFileSync(CHROMIUM_PATH, ['--version'], { encoding: 'utf8', timeout: 20_000 }).trim();
  } catch {
    // Debian's wrapper script may fail to print; the package metadata still names the version.
    try {
      const status = readFileSync('/var/lib/dpkg/status', 'utf8');
      const block = status.split('\n\n').find((b) => b.startsWith('Package: chromium\n'));
      return block?.match(/^Version: (.*)$/m)?.[1] ?? 'unknown';
    } catch {
      return 'unknown';
    }
  }
}
