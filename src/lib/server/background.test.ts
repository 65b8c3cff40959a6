import { describe, expect, it, vi } from 'vitest';
import { loop } from './background.ts';

describe('background loop kick (issue 10 point 12)', () => {
  it('runs at once when kicked, never overlaps, and runs once more for kicks during a run', async () => {
    let running = 0;
    let overlapped = false;
    let runs = 0;
    let release: () => void = () => {};
    const work = vi.fn(async () => {
      running += 1;
      if (running > 1) overlapped = true;
      runs += 1;
      await new Promise<void>((r) => {
        release = r;
      });
      running -= 1;
    });
    const kick = loop('test', 3_600_000, work); // the poll never fires within the test
    kick();
    await Promise.resolve();
    expect(runs).toBe(1);
    kick();
    kick(); // during the run: coalesced into one more run
    release();
    await new Promise((r) => setTimeout(r, 10));
    expect(runs).toBe(2);
    release();
    await new Promise((r) => setTimeout(r, 10));
    expect(runs).toBe(2);
    expect(overlapped).toBe(false);
  });
});
