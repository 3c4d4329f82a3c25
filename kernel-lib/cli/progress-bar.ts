import type { StudyProgress } from '../study/run-study';

function clock(seconds: number): string {
  if (!Number.isFinite(seconds)) return '--:--';
  const s = Math.round(seconds);
  const m = Math.floor(s / 60);
  return m >= 60 ? `${Math.floor(m / 60)}h${String(m % 60).padStart(2, '0')}m` : `${m}:${String(s % 60).padStart(2, '0')}`;
}

/**
 * A progress line on stderr: a redrawn bar on a terminal, one line per ~10% elsewhere (logs, CI),
 * with the replicate rate and the time left.
 */
export function progressBar(label: string, stream: NodeJS.WriteStream = process.stderr): { update(p: StudyProgress): void; end(): void } {
  const tty = Boolean(stream.isTTY);
  let lastDecile = -1;
  let lastDraw = 0;
  let drawn = false;
  return {
    update(p) {
      const share = p.total > 0 ? p.done / p.total : 1;
      const text = `${label} ${Math.floor(share * 100).toString().padStart(3)}% ${p.done}/${p.total} replicates` +
        `${p.resumed ? ` (+${p.resumed} resumed)` : ''} · ${Math.round(p.replicatesPerSecond)}/s · ${clock(p.secondsLeft)} left`;
      if (tty) {
        const now = Date.now();
        if (now - lastDraw < 100 && p.done < p.total) return;
        lastDraw = now;
        const width = 24;
        const full = Math.round(share * width);
        stream.write(`\r[${'#'.repeat(full)}${'.'.repeat(width - full)}] ${text}\x1b[K`);
        drawn = true;
      } else {
        const decile = Math.floor(share * 10);
        if (decile !== lastDecile) { lastDecile = decile; stream.write(`${text}\n`); }
      }
    },
    end() {
      if (tty && drawn) stream.write('\n');
    },
  };
}
