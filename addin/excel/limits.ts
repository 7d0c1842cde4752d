/**
 * The limits Excel sets on what one request may carry, and how the adapter stays inside them.
 * "Resource limits and performance optimization for Office Add-ins" (Excel add-ins section): Excel on
 * the web refuses a request or a response over 5 MB (RichApi.Error), and a range read covers at most
 * 5,000,000 cells; split the work and call context.sync() for each piece. "Read or write to a large
 * range using the Excel JavaScript API": write in row blocks, read in row blocks, retry a block
 * smaller when a limit error comes back.
 */

/** What one block of rows may carry (values and number formats as JSON): well inside the 5 MB. */
export const BLOCK_BYTES = 1_500_000;
/** Office's own limits, for messages. */
export const PAYLOAD_LIMIT_TEXT = '5 MB';
export const READ_CELL_LIMIT = 5_000_000;
/** Our allowance for Office's wrapping of one command (action and object path), in bytes. */
export const COMMAND_BYTES = 300;

/** UTF-8 length of a string, without building the bytes. */
export function utf8Bytes(s: string): number {
  let n = s.length;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c >= 0x80) n += c >= 0x800 && (c < 0xd800 || c > 0xdfff) ? 2 : 1;
  }
  return n;
}

/** Bytes of a value as JSON: how Office sends values and number formats. */
export const jsonBytes = (value: unknown): number => utf8Bytes(JSON.stringify(value) ?? '');

function code(e: unknown): string | undefined {
  const c = (e as { code?: unknown } | null)?.code;
  return typeof c === 'string' ? c : undefined;
}

/** A request or response was over Excel's size limit ("Error handling with the application-specific JavaScript APIs"). */
export function isPayloadLimit(e: unknown): boolean {
  const c = code(e);
  return c === 'RequestPayloadSizeLimitExceeded' || c === 'ResponsePayloadSizeLimitExceeded';
}

/** Excel refused the batch because the user is typing in a cell. */
export function isCellEditError(e: unknown): boolean {
  return code(e) === 'InvalidOperationInCellEditMode';
}

/** Message of an Office error (OfficeExtension.Error carries a code) or any other. */
export function describe(e: unknown): string {
  if (e instanceof Error) {
    const c = code(e);
    return c && !e.message.includes(c) ? `${e.message} (${c})` : e.message;
  }
  return String(e);
}
