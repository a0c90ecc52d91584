/**
 * Where a JSON text stops being JSON: line, column and what was expected,
 * for the error message a user sees. A small scanner of the JSON grammar
 * (RFC 8259 / ECMA-404), used only after JSON.parse has failed; it names the
 * first offending character, with hints for the two usual causes in
 * hand-written files (comments and trailing commas).
 */

export interface JsonSyntaxError {
  /** 1-based line and column (columns count UTF-16 code units, tabs as one). */
  readonly line: number;
  readonly column: number;
  readonly message: string;
}

class Stop extends Error {
  constructor(
    readonly at: number,
    readonly why: string,
  ) {
    super(why);
  }
}

/** The first syntax error of `text`, or null when it is valid JSON. */
export function locateJsonError(text: string): JsonSyntaxError | null {
  let i = 0;
  const n = text.length;
  const ws = () => {
    while (i < n && (text[i] === ' ' || text[i] === '\t' || text[i] === '\n' || text[i] === '\r')) i++;
  };
  const shown = (k: number) => (k >= n ? 'end of the file' : `"${text[k]}"`);
  const unexpected = (k: number, expected: string): never => {
    if (text.startsWith('//', k) || text.startsWith('/*', k)) throw new Stop(k, 'a comment; JSON has no comments, remove it');
    throw new Stop(k, `unexpected ${shown(k)}, expected ${expected}`);
  };
  const literal = (word: string) => {
    if (text.startsWith(word, i)) i += word.length;
    else unexpected(i, 'a value');
  };
  const string = () => {
    i++; // opening quote
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return;
      }
      if (c < 0x20) throw new Stop(i, 'a line break or control character inside a string; write it as \\n or \\t');
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) throw new Stop(i, 'a bad \\u escape; it needs four hex digits');
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else throw new Stop(i, `a bad escape "\\${e ?? ''}" in a string`);
        continue;
      }
      i++;
    }
    throw new Stop(n, 'a string that is never closed (a missing ")');
  };
  const number = () => {
    const m = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
    if (m === null || m[0] === '' || m[0] === '-') unexpected(i, 'a value');
    i += (m as RegExpExecArray)[0].length;
  };
  const value = (depth: number): void => {
    if (depth > 512) throw new Stop(i, 'nesting deeper than 512 levels');
    ws();
    const c = text[i];
    if (c === '{') {
      i++;
      ws();
      if (text[i] === '}') {
        i++;
        return;
      }
      for (;;) {
        ws();
        if (text[i] !== '"') {
          if (text[i] === '}') throw new Stop(i, 'a comma before "}"; remove the trailing comma');
          unexpected(i, 'a key in double quotes');
        }
        string();
        ws();
        if (text[i] !== ':') unexpected(i, '":" after the key');
        i++;
        value(depth + 1);
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === '}') {
          i++;
          return;
        }
        unexpected(i, '"," or "}" after a value');
      }
    }
    if (c === '[') {
      i++;
      ws();
      if (text[i] === ']') {
        i++;
        return;
      }
      for (;;) {
        ws();
        if (text[i] === ']') throw new Stop(i, 'a comma before "]"; remove the trailing comma');
        value(depth + 1);
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === ']') {
          i++;
          return;
        }
        unexpected(i, '"," or "]" after a value');
      }
    }
    if (c === '"') return string();
    if (c === 't') return literal('true');
    if (c === 'f') return literal('false');
    if (c === 'n') return literal('null');
    if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) return number();
    unexpected(i, 'a value');
  };
  try {
    if (text.charCodeAt(0) === 0xfeff) i = 1; // a byte-order mark is tolerated by readers; say nothing about it
    value(0);
    ws();
    if (i < n) unexpected(i, 'nothing more after the end of the JSON value');
    return null;
  } catch (e) {
    if (!(e instanceof Stop)) throw e;
    return { ...lineColumn(text, e.at), message: e.why };
  }
}

function lineColumn(text: string, at: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let k = 0; k < at && k < text.length; k++) {
    if (text[k] === '\n') {
      line++;
      start = k + 1;
    }
  }
  return { line, column: at - start + 1 };
}
