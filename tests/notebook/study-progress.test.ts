import { describe, expect, it } from 'vitest';
import { studyProgressLines } from '../../kernel-lib/notebook/study-progress';

const p = (done: number, total: number, resumed = 0) => ({ done, total, resumed, replicatesPerSecond: 10, secondsLeft: 1 }) as never;

// Progress in a notebook cell (module contract): resumed replicates said once, not counted.
describe('studyProgressLines', () => {
  it('says once how many replicates were already on disk, then shows progress of the rest', () => {
    const lines: string[] = [];
    const progress = studyProgressLines('study', { write: (l) => lines.push(l) });
    progress.onProgress(p(0, 50, 150));
    progress.onProgress(p(50, 50, 150));
    progress.finish();
    expect(lines[0]).toBe('study: 150 replicates already on disk, resuming');
    expect(lines.filter((l) => l.includes('already on disk'))).toHaveLength(1);
    expect(lines.length).toBeGreaterThan(1);
  });

  it('a run with nothing left says so at the end; a run never started says nothing', () => {
    const lines: string[] = [];
    const progress = studyProgressLines('study', { write: (l) => lines.push(l) });
    progress.onProgress(p(0, 0, 200));
    progress.finish();
    expect(lines).toEqual(['study: 200 replicates already on disk, resuming', 'study: nothing left to run (200 replicates on disk)']);
    const silent: string[] = [];
    studyProgressLines('x', { write: (l) => silent.push(l) }).finish();
    expect(silent).toEqual([]);
  });
});
