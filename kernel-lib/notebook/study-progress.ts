/** Progress lines for runStudy in a notebook cell: one callback to pass as onProgress, and finish() after the run. */
import { progressDisplay, type Progress, type ProgressOptions } from '../display/progress';
import type { StudyProgress } from '../study/run-study';

export interface StudyProgressLines {
  onProgress: (p: StudyProgress) => void;
  /** Print the closing line (elapsed time, or that everything was already on disk). */
  finish: () => void;
}

/**
 * The bar is created at the first report, when the number of replicates still to do is known;
 * replicates found on disk (a resumed run) are said once instead of counted.
 */
export function studyProgressLines(label: string, options: ProgressOptions = {}): StudyProgressLines {
  const write = options.write ?? ((line: string) => void process.stdout.write(line + '\n'));
  let bar: Progress | null = null;
  let resumed = 0;
  let started = false;
  return {
    onProgress(p) {
      if (!started) {
        started = true;
        resumed = p.resumed;
        if (p.resumed > 0) write(`${label}: ${p.resumed} replicates already on disk, resuming`);
        if (p.total > 0) bar = progressDisplay(p.total, label, { ...options, write });
      }
      bar?.update(p.done);
    },
    finish() {
      if (bar) bar.finish();
      else if (started) write(`${label}: nothing left to run (${resumed} replicates on disk)`);
    },
  };
}
