/**
 * Progress lines for long runs, as plain lines on stdout, which tslab streams into the cell
 * while it runs: one each time another tenth is done or `everyMs` has passed since the last
 * line (whichever comes first), and one from finish().
 * Why not a display updated in place: tslab's public API has no progress widget, and its
 * `newDisplay()` (update_display_data) works only inside a kernel and, in a rendered notebook,
 * keeps only the last state. Plain lines behave the same in Node scripts, in JupyterLab and in
 * the rendered HTML, where they stay as a record of how long the run took.
 */

export interface ProgressOptions {
  /** Print when this fraction of the total more is done (default 0.1). */
  everyFraction?: number;
  /** Print at least this often while updates arrive, in milliseconds (default 2000). */
  everyMs?: number;
  /** Clock in milliseconds (default Date.now); injectable for tests. */
  now?: () => number;
  /** Line sink (default: process.stdout.write with a newline). */
  write?: (line: string) => void;
}

export interface Progress {
  /** Report that `done` of `total` items are finished (monotone; larger than total is an error). */
  update(done: number): void;
  /** Print the final line (once) with the elapsed time. */
  finish(): void;
}

function seconds(ms: number): string {
  return ms < 10000 ? `${(ms / 1000).toFixed(1)} s` : `${Math.round(ms / 1000)} s`;
}

export function progressDisplay(total: number, label: string, options: ProgressOptions = {}): Progress {
  if (!Number.isInteger(total) || total <= 0) {
    throw new RangeError(`progressDisplay "${label}": total must be a positive integer, got ${total}`);
  }
  const everyFraction = options.everyFraction ?? 0.1;
  const everyMs = options.everyMs ?? 2000;
  if (!(everyFraction > 0 && everyFraction <= 1)) {
    throw new RangeError(`progressDisplay "${label}": everyFraction must be in (0, 1], got ${everyFraction}`);
  }
  if (!(everyMs > 0)) throw new RangeError(`progressDisplay "${label}": everyMs must be positive, got ${everyMs}`);
  const now = options.now ?? Date.now;
  const write = options.write ?? ((line: string) => void process.stdout.write(line + '\n'));
  const start = now();
  const step = Math.max(1, Math.ceil(everyFraction * total));
  let nextCount = step;
  let lastPrint = start;
  let lastDone = 0;
  let finished = false;

  return {
    update(done: number): void {
      if (finished) return;
      if (!Number.isFinite(done) || done < 0 || done > total) {
        throw new RangeError(`progressDisplay "${label}": update(done) expects 0..${total}, got ${done}`);
      }
      lastDone = Math.max(lastDone, done);
      const t = now();
      if (lastDone < nextCount && t - lastPrint < everyMs) return;
      while (nextCount <= lastDone) nextCount += step;
      lastPrint = t;
      const elapsed = t - start;
      const percent = Math.floor((100 * lastDone) / total);
      const left = lastDone > 0 && lastDone < total ? `, about ${seconds((elapsed * (total - lastDone)) / lastDone)} left` : '';
      write(`${label}: ${lastDone}/${total} (${percent}%), ${seconds(elapsed)} elapsed${left}`);
    },
    finish(): void {
      if (finished) return;
      finished = true;
      const elapsed = now() - start;
      const what = lastDone === total ? 'done' : `stopped at ${lastDone}/${total}`;
      write(`${label}: ${what} in ${seconds(elapsed)}`);
    },
  };
}
