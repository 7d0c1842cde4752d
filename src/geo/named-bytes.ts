/** A file as the engine sees it: its name (for messages) and its bytes. */
export interface NamedBytes {
  name: string;
  bytes: Uint8Array;
}
