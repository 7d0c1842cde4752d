/**
 * The one error type for bad input. Its message is written for the analyst: it names the file,
 * row, column or feature at fault and says what to do. The CLI and the add-in print the message
 * only, never a stack trace.
 */
export interface InputLocation {
  file?: string;
  /** 1-based row as the user sees it in the table (header = row 1). */
  row?: number;
  column?: string;
  /** 1-based feature number in the boundary file, or its ID. */
  feature?: number | string;
}

export class InputError extends Error {
  readonly where: InputLocation;
  constructor(message: string, where: InputLocation = {}) {
    super(message);
    this.name = 'InputError';
    this.where = where;
  }
}

/** Lists at most `max` items and says how many more there are, for messages that name rows. */
export function listSome(items: readonly (string | number)[], max = 10): string {
  const shown = items.slice(0, max).join(', ');
  return items.length > max ? `${shown} and ${items.length - max} more` : shown;
}
