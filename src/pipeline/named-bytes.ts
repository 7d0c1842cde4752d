/** A file as the engine sees it: a name (for messages and the run record) and its bytes. */
export interface NamedBytesLike {
  name: string;
  bytes: Uint8Array;
}
