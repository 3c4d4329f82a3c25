/** A study folder name derived from the study's settings, so that changed settings start a new folder and unchanged ones resume. */
import { createHash } from 'node:crypto';

/** "study-" and 10 hex digits of SHA-256 over the design JSON and the replicate count. */
export function studyFolderName(design: unknown, replicates: number): string {
  const hash = createHash('sha256').update(JSON.stringify({ design, replicates })).digest('hex');
  return `study-${hash.slice(0, 10)}`;
}
