import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, test, vi } from 'vitest';
import { runCli } from '../../support/run-cli.js';

afterEach(() => vi.restoreAllMocks());

const USAGE_LINE = 'usage:\n  syncring simulate SCENARIO.json';

// Whether the usage text follows an error is decided where the error is made (a call of the
// wrong shape), not by words that happen to appear in its message.
describe('the usage text after a command-line error', () => {
  test.each([
    [['simulate', 'pair-adler'], 'syncring: simulate needs --until TAU\n'],
    [['simulate', 'pair-adler', '--until', '5', '--fast'], 'syncring: unknown option --fast\n'],
    [['frobnicate'], 'syncring: unknown command "frobnicate"\n'],
  ])('%j is a call of the wrong shape: message, then the usage text', async (argv, message) => {
    const { code, err } = await runCli(argv);
    expect(code).toBe(2);
    expect(err.startsWith(message)).toBe(true);
    expect(err.slice(message.length).startsWith(USAGE_LINE)).toBe(true);
  });

  test('a missing file whose name holds the word "command" is bad input, not a wrong call: the message alone', async () => {
    const { code, err } = await runCli(['simulate', 'command-board.json', '--until', '10']);
    expect(code).toBe(2);
    expect(err).toMatch(/^syncring: command-board\.json: no such file \(built-in scenarios: [^\n]*\)\n$/);
  });

  test('a campaign that "needs" faults is bad input in the file: the message alone, naming the file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'syncring-cli-usage-'));
    const campaign = join(dir, 'empty-campaign.json');
    writeFileSync(campaign, '{}');
    const { code, err } = await runCli(['soak', 'pair-adler', '--campaign', campaign, '--until', '10', '--out', join(dir, 'out')]);
    expect(code).toBe(2);
    expect(err).toBe(`syncring: ${campaign}: a campaign needs faults, a random generator, or both\n`);
  });
});
