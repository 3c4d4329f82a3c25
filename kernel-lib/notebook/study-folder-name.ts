/** A study folder name derived from the study's identity, so that changed settings start a new folder and unchanged ones resume. */
import { studyFingerprint } from '../study/run-study';
import { studyFolderNameOf } from '../study/folder-layout';

/**
 * "study-" and 10 hex digits of the fingerprint runStudy checks when resuming (design, replicate
 * count, variants with defaults filled in, project version): a folder of this name is never refused.
 */
export function studyFolderName(design: unknown, replicates: number): string {
  return studyFolderNameOf(studyFingerprint(design, { replicates }));
}
