/**
 * Notes on how the files were read (a text encoding guessed, a code page, merged cells, a hidden
 * sheet skipped, deleted records left out) often explain a later refusal: a join that fails because
 * the IDs were decoded with the wrong code page, a blank that is really the lower half of a merged
 * range. The note would be lost with the refusal, so it is added to the refusal's message.
 */
import { InputError } from '../errors.js';
import { JoinError } from '../geo/index.js';

const MAX_NOTES = 600;

export function withReadNotes<T>(notes: string[], step: () => T): T {
  try {
    return step();
  } catch (e) {
    if (!(e instanceof InputError) || notes.length === 0) throw e;
    let text = notes.join(' ');
    if (text.length > MAX_NOTES) text = `${text.slice(0, MAX_NOTES)}…`;
    const message = `${e.message}\nNoted while reading the files: ${text}`;
    throw e instanceof JoinError ? new JoinError(message, e.report, e.where.file) : new InputError(message, e.where);
  }
}
