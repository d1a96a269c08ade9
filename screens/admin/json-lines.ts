/**
 * Where things are in a JSON text, by line: the line each value starts on, keyed by its path
 * ("stops.0.readings.1.tag"), and the line of a JSON.parse error's position. Pure; used to put
 * the route validator's messages beside the lines of the pasted template.
 */

/** Lines (1-based) of every value in a JSON text, by dotted path ("" is the whole document). Throws on text that is not JSON. */
export function jsonValueLines(text: string): Map<string, number> {
  const lines = new Map<string, number>();
  let i = 0;
  let line = 1;
  const ws = () => {
    while (i < text.length && /\s/.test(text[i])) {
      if (text[i] === '\n') line++;
      i++;
    }
  };
  const fail = (what: string): never => {
    throw new SyntaxError(`${what} at line ${line}`);
  };
  const str = (): string => {
    if (text[i] !== '"') fail('Expected a string');
    let out = '';
    i++;
    while (i < text.length && text[i] !== '"') {
      if (text[i] === '\\') {
        const esc = text[i + 1];
        out +=
          esc === 'n'
            ? '\n'
            : esc === 't'
              ? '\t'
              : esc === 'u'
                ? String.fromCharCode(parseInt(text.slice(i + 2, i + 6), 16))
                : esc;
        i += esc === 'u' ? 6 : 2;
      } else {
        if (text[i] === '\n') fail('Unterminated string');
        out += text[i++];
      }
    }
    if (text[i] !== '"') fail('Unterminated string');
    i++;
    return out;
  };
  const value = (path: string): void => {
    ws();
    lines.set(path, line);
    const at = (k: string | number) => (path === '' ? String(k) : `${path}.${k}`);
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
        const key = str();
        ws();
        if (text[i] !== ':') fail('Expected ":"');
        i++;
        value(at(key));
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === '}') {
          i++;
          return;
        }
        fail('Expected "," or "}"');
      }
    }
    if (c === '[') {
      i++;
      ws();
      if (text[i] === ']') {
        i++;
        return;
      }
      for (let n = 0; ; n++) {
        value(at(n));
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === ']') {
          i++;
          return;
        }
        fail('Expected "," or "]"');
      }
    }
    if (c === '"') {
      str();
      return;
    }
    const m = /^(-?\d+(\.\d+)?([eE][-+]?\d+)?|true|false|null)/.exec(text.slice(i, i + 40));
    if (!m) fail('Unexpected character');
    i += m![0].length;
  };
  value('');
  ws();
  if (i < text.length) fail('Unexpected text after the end');
  return lines;
}

/** The line of a server detail path ("template.stops.0.name") in the text: the deepest value of that path that exists. */
export function lineOfPath(lines: Map<string, number>, path: string): number | null {
  let p = path.replace(/^template\.?/, '');
  for (;;) {
    const l = lines.get(p);
    if (l !== undefined) return l;
    if (p === '') return null;
    p = p.includes('.') ? p.slice(0, p.lastIndexOf('.')) : '';
  }
}

/** JSON.parse's complaint about the text, with its line when the engine says a position. */
export function jsonProblem(text: string): { message: string; line: number | null } | null {
  try {
    JSON.parse(text);
    return null;
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    const pos = /position (\d+)/.exec(message);
    const lineCol = /line (\d+)/.exec(message);
    const line = lineCol ? Number(lineCol[1]) : pos ? text.slice(0, Number(pos[1])).split('\n').length : null;
    return { message, line };
  }
}
