import { describe, expect, it } from 'vitest';
import { progressBar } from '../../kernel-lib/cli/progress-bar';

/** A stand-in for process.stderr that records what is written. */
function fakeStream(isTTY: boolean) {
  const writes: string[] = [];
  return { stream: { isTTY, write: (s: string) => { writes.push(s); return true; } } as unknown as NodeJS.WriteStream, writes };
}
const progress = (done: number, total: number, extra: Record<string, number> = {}) =>
  ({ done, total, resumed: 0, replicatesPerSecond: 41.6, secondsLeft: 125, ...extra }) as never;

// 4000 s = 66 min 40 s → "1h06m". Terminal conventions (common practice, no source): a redrawn line ("\r" then erase to end of line,
// ANSI CSI K) on a terminal; whole lines, about one per 10%, in logs. Expected text written by hand.
describe('progressBar', () => {
  it('outside a terminal writes one line per tenth of the work', () => {
    const { stream, writes } = fakeStream(false);
    const bar = progressBar('scenario 1/2', stream);
    for (let done = 0; done <= 200; done += 5) bar.update(progress(done, 200));
    bar.end();
    expect(writes).toHaveLength(11); // 0%, 10%, ..., 100%
    expect(writes[0]).toBe('scenario 1/2   0% 0/200 replicates · 42/s · 2:05 left\n');
    expect(writes[10]).toMatch(/^scenario 1\/2 100% 200\/200 replicates/);
  });

  it('on a terminal redraws one line with a bar and ends it with a newline', () => {
    const { stream, writes } = fakeStream(true);
    const bar = progressBar('study', stream);
    bar.update(progress(3, 4, { resumed: 2, secondsLeft: 4000 }));
    bar.update(progress(4, 4, { secondsLeft: 0 })); // the last update is always drawn
    bar.end();
    expect(writes[0]).toBe(`\r[${'#'.repeat(18)}${'.'.repeat(6)}] study  75% 3/4 replicates (+2 resumed) · 42/s · 1h06m left\x1b[K`);
    expect(writes[1]).toMatch(/^\r\[#{24}\] study 100% 4\/4/);
    expect(writes[1]).toContain('0:00 left');
    expect(writes[2]).toBe('\n');
  });

  it('shows an unknown time left as --:-- and writes nothing at the end when nothing was drawn', () => {
    const { stream, writes } = fakeStream(false);
    const bar = progressBar('x', stream);
    bar.update(progress(0, 10, { secondsLeft: Infinity }));
    expect(writes[0]).toContain('--:-- left');
    const t = fakeStream(true);
    progressBar('y', t.stream).end();
    expect(t.writes).toEqual([]);
  });
});
