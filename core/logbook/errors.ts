/** A problem with data given to the logbook, in plain words (which record or field, what was expected). */
export class LogbookDataError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'LogbookDataError';
  }
}
