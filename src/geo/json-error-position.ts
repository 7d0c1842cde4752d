/**
 * Finds where JSON text first goes wrong, for messages. The JavaScript engine's JSON.parse does not
 * always give a position ("Unexpected token ','"), so on failure the text is scanned once more here.
 * Only run after JSON.parse has failed.
 */
export function jsonErrorOffset(text: string): number {
  let i = 0;
  const n = text.length;
  const ws = () => {
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 32 || c === 9 || c === 10 || c === 13) i++;
      else break;
    }
  };
  const fail = (): never => {
    throw i;
  };
  const string = () => {
    i++; // opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 34) return void i++;
      if (c < 32) fail();
      i += c === 92 ? 2 : 1;
    }
    fail();
  };
  const number = () => {
    const m = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
    if (!m || m[0].length === 0) fail();
    i += m![0].length;
  };
  const value = (): void => {
    ws();
    if (i >= n) fail();
    const c = text[i];
    if (c === '{') {
      i++;
      ws();
      if (text[i] === '}') return void i++;
      for (;;) {
        ws();
        if (text[i] !== '"') fail();
        string();
        ws();
        if (text[i] !== ':') fail();
        i++;
        value();
        ws();
        if (text[i] === ',') i++;
        else if (text[i] === '}') return void i++;
        else fail();
      }
    }
    if (c === '[') {
      i++;
      ws();
      if (text[i] === ']') return void i++;
      for (;;) {
        value();
        ws();
        if (text[i] === ',') i++;
        else if (text[i] === ']') return void i++;
        else fail();
      }
    }
    if (c === '"') return string();
    for (const word of ['true', 'false', 'null']) if (text.startsWith(word, i)) return void (i += word.length);
    number();
  };
  try {
    value();
    ws();
    return i < n ? i : -1;
  } catch (at) {
    return typeof at === 'number' ? at : -1;
  }
}
