import { describe, expect, it } from 'vitest';
import { progressDisplay } from '../../kernel-lib/display/index';

function fakeRun(total: number, stepMs: number, everyMs?: number) {
  let t = 1000;
  const lines: string[] = [];
  const p = progressDisplay(total, 'replicates', { now: () => t, write: (l) => lines.push(l), everyMs });
  return {
    lines,
    run(done: number) {
      t += stepMs;
      p.update(done);
    },
    finish() {
      p.finish();
    },
  };
}

describe('progressDisplay', () => {
  it('prints once per tenth when updates are fast, then a final line', () => {
    const r = fakeRun(100, 10);
    for (let i = 1; i <= 100; i++) r.run(i);
    r.finish();
    // 10 lines (10%, 20%, ... 100%) plus the finish line; arithmetic by hand.
    expect(r.lines).toHaveLength(11);
    expect(r.lines[0]).toBe('replicates: 10/100 (10%), 0.1 s elapsed, about 0.9 s left');
    expect(r.lines[9]).toBe('replicates: 100/100 (100%), 1.0 s elapsed');
    expect(r.lines[10]).toBe('replicates: done in 1.0 s');
  });

  it('prints every 2 s when updates are slow even if no tenth was crossed', () => {
    const r = fakeRun(1000, 700);
    for (let i = 1; i <= 9; i++) r.run(i);
    // Updates at 0.7, 1.4, 2.1 (print), 2.8, 3.5, 4.2 (print), 4.9, 5.6, 6.3 (print) s.
    expect(r.lines).toEqual([
      'replicates: 3/1000 (0%), 2.1 s elapsed, about 698 s left',
      'replicates: 6/1000 (0%), 4.2 s elapsed, about 696 s left',
      'replicates: 9/1000 (0%), 6.3 s elapsed, about 694 s left',
    ]);
    r.finish();
    expect(r.lines[3]).toBe('replicates: stopped at 9/1000 in 6.3 s');
  });

  it('ignores updates after finish and a second finish', () => {
    const r = fakeRun(10, 1);
    r.run(10);
    r.finish();
    r.run(10);
    r.finish();
    expect(r.lines).toHaveLength(2);
  });

  it('rejects a bad total or an out-of-range count with the label in the message', () => {
    expect(() => progressDisplay(0, 'fits')).toThrow(/progressDisplay "fits": total must be a positive integer, got 0/);
    expect(() => progressDisplay(10, 'fits', { everyFraction: 0 })).toThrow(/everyFraction must be in \(0, 1\]/);
    const p = progressDisplay(10, 'fits', { write: () => undefined });
    expect(() => p.update(11)).toThrow(/update\(done\) expects 0\.\.10, got 11/);
    expect(() => p.update(NaN)).toThrow(/got NaN/);
  });
});
