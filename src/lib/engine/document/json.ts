/**
 * JSON text to a value, with the two checks JSON.parse skips: a duplicate key inside one
 * object (JSON.parse keeps the last silently) and the line and column of a syntax error.
 * The scan follows RFC 8259's grammar; the value itself comes from JSON.parse.
 */
export interface JsonProblem {
  code: 'json_syntax' | 'duplicate_key';
  path: string;
  message: string;
  line?: number;
  column?: number;
}

export type JsonResult = { ok: true; value: unknown } | { ok: false; problems: JsonProblem[] };

function lineCol(text: string, pos: number): { line: number; column: number } {
  let line = 1;
  let col = 1;
  for (let i = 0; i < pos && i < text.length; i++) {
    if (text[i] === '\n') {
      line++;
      col = 1;
    } else col++;
  }
  return { line, column: col };
}

export function parseJson(text: string): JsonResult {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const m = /position (\d+)/.exec(msg);
    const where = m ? lineCol(text, Number(m[1])) : undefined;
    return {
      ok: false,
      problems: [
        {
          code: 'json_syntax',
          path: '',
          message: `not valid JSON${where ? ` at line ${where.line}, column ${where.column}` : ''}: ${msg}`,
          ...where
        }
      ]
    };
  }
  const problems: JsonProblem[] = [];
  scanDuplicates(text, problems);
  return problems.length ? { ok: false, problems } : { ok: true, value };
}

/** Walks the (already valid) text and reports keys repeated within one object. */
function scanDuplicates(text: string, problems: JsonProblem[]): void {
  let i = 0;
  const ws = () => {
    while (i < text.length && ' \t\n\r'.includes(text[i])) i++;
  };
  const str = (): string => {
    const start = i;
    i++; // opening quote
    while (text[i] !== '"') i += text[i] === '\\' ? 2 : 1;
    i++;
    return JSON.parse(text.slice(start, i)) as string;
  };
  const value = (path: string): void => {
    ws();
    const c = text[i];
    if (c === '{') {
      i++;
      const seen = new Set<string>();
      ws();
      if (text[i] === '}') {
        i++;
        return;
      }
      for (;;) {
        ws();
        const keyPos = i;
        const key = str();
        const p = path ? `${path}.${key}` : key;
        if (seen.has(key)) {
          const where = lineCol(text, keyPos);
          problems.push({ code: 'duplicate_key', path: p, message: `the key '${key}' appears twice in one object (line ${where.line}); only one can be kept`, ...where });
        }
        seen.add(key);
        ws();
        i++; // colon
        value(p);
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        i++; // closing brace
        return;
      }
    }
    if (c === '[') {
      i++;
      ws();
      if (text[i] === ']') {
        i++;
        return;
      }
      for (let k = 0; ; k++) {
        value(`${path}[${k}]`);
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        i++;
        return;
      }
    }
    if (c === '"') {
      str();
      return;
    }
    while (i < text.length && !',]} \t\n\r'.includes(text[i])) i++;
  };
  value('');
}
