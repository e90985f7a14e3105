import { afterEach, beforeEach, describe, expect, test, vi } from 'vitest';
import { Progress } from '../../server/progress.js';

/** A stand-in for stderr that keeps what was written. */
function stream(isTTY: boolean): NodeJS.WriteStream & { text: string } {
  const s = {
    isTTY,
    text: '',
    write(chunk: string) {
      s.text += chunk;
      return true;
    },
  };
  return s as unknown as NodeJS.WriteStream & { text: string };
}

describe('progress on stderr', () => {
  beforeEach(() => {
    vi.useFakeTimers();
    vi.setSystemTime(new Date('2026-12-01T00:00:00Z'));
  });
  afterEach(() => vi.useRealTimers());

  test('not a terminal: plain lines, one per interval, none in the first second', () => {
    const out = stream(false);
    const progress = new Progress('soak', 100, out, 60);
    progress.update(1);
    expect(out.text).toBe('');
    vi.advanceTimersByTime(2000);
    progress.update(10, 'slow 10/100');
    vi.advanceTimersByTime(30_000);
    progress.update(20);
    vi.advanceTimersByTime(31_000);
    progress.update(40);
    const lines = out.text.split('\n').filter(Boolean);
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^soak \[###-+\] 10\.0% slow 10\/100 ETA /);
    expect(out.text).not.toContain('\r');
  });

  test('a resumed run: the ETA uses the rate seen in this process, not the fraction done before it', () => {
    const out = stream(false);
    const progress = new Progress('soak', 100, out, 60);
    progress.update(50); // resumed at half way
    vi.advanceTimersByTime(10_000);
    progress.update(60); // 10 units in 10 s: 40 left take 40 s
    expect(out.text).toMatch(/ETA 40 s/);
  });

  test('a terminal: one redrawn bar, closed by a newline at the end', () => {
    const out = stream(true);
    const progress = new Progress('simulate', 10, out);
    vi.advanceTimersByTime(1500);
    progress.update(5);
    vi.advanceTimersByTime(300);
    progress.update(10);
    progress.finish();
    expect(out.text.match(/\r/g)).toHaveLength(2);
    expect(out.text.endsWith('\n')).toBe(true);
    expect(out.text).toContain('100.0%');
  });
});
