/** Problems with the logbook file, in plain words, naming the file. */
import { FileProblem } from '../files.ts';

export type LogbookProblemKind = 'missing' | 'busy' | 'corrupt' | 'foreign' | 'newer' | 'read-only' | 'lock-lost' | 'not-available';

/** A FileProblem (printed as "<file>: <reason>") that also says what kind of problem it is. */
export class LogbookProblem extends FileProblem {
  constructor(
    file: string,
    reason: string,
    readonly kind: LogbookProblemKind,
    /** For a damaged file: the last good copy that can be restored, when there is one. */
    readonly lastGood: string | null = null,
  ) {
    super(file, reason);
  }
}
