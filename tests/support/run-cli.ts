import { vi } from 'vitest';
import { main } from '../../server/cli.js';

/** Runs the CLI in this process with stdout and stderr captured. */
export async function runCli(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => ((out += String(chunk)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => ((err += String(chunk)), true));
  try {
    return { code: await main(argv), out, err };
  } finally {
    vi.restoreAllMocks();
  }
}
