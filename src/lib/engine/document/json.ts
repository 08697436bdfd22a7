/**
 * JSON text to a value, with the two checks JSON.parse lacks: a duplicate key inside one
 * object (JSON.parse keeps the last silently) and the line and column of a syntax error
 * (V8 gives no position for many of its messages). One pass of a scanner that follows the
 * grammar of RFC 8259 finds both; the value itself then comes from JSON.parse.
 */
/** Deepest nesting of lists and objects accepted in a document (the contract needs about 6). */
export const MAX_JSON_DEPTH = 64;

/** Largest JSON text accepted, in characters (a 20-year daily run bundle is far below). */
export const MAX_JSON_CHARS = 50_000_000;

export interface JsonProblem {
  code: 'json_syntax' | 'duplicate_key' | 'too_deep' | 'too_large';
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

class SyntaxProblem extends Error {
  constructor(readonly pos: number, readonly expected: string) {
    super(expected);
  }
}

class TooDeep extends Error {
  constructor(readonly pos: number) {
    super('too deep');
  }
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;

export function parseJson(input: string): JsonResult {
  // A byte-order mark is not part of the document (RFC 8259 §8.1 allows a parser to ignore it).
  const text = input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  if (text.length > MAX_JSON_CHARS) {
    return {
      ok: false,
      problems: [{ code: 'too_large', path: '', message: `the file is too large to be a document: ${text.length.toLocaleString('en')} characters (at most ${MAX_JSON_CHARS.toLocaleString('en')})` }]
    };
  }
  const problems: JsonProblem[] = [];
  try {
    scan(text, problems);
  } catch (e) {
    if (e instanceof TooDeep) {
      const where = lineCol(text, e.pos);
      return {
        ok: false,
        problems: [{ code: 'too_deep', path: '', message: `lists and objects are nested more than ${MAX_JSON_DEPTH} deep (at line ${where.line}, column ${where.column}); no document of this app is`, ...where }]
      };
    }
    if (!(e instanceof SyntaxProblem)) throw e;
    const where = lineCol(text, e.pos);
    const found = e.pos >= text.length ? 'the end of the text' : `'${text[e.pos]}'`;
    return {
      ok: false,
      problems: [
        {
          code: 'json_syntax',
          path: '',
          message: `not valid JSON at line ${where.line}, column ${where.column}: found ${found}, expected ${e.expected}`,
          ...where
        }
      ]
    };
  }
  if (problems.length) return { ok: false, problems };
  return { ok: true, value: JSON.parse(text) };
}

function scan(text: string, problems: JsonProblem[]): void {
  let i = 0;
  const ws = () => {
    while (i < text.length && (text[i] === ' ' || text[i] === '\t' || text[i] === '\n' || text[i] === '\r')) i++;
  };
  const expect = (c: string, what: string) => {
    if (text[i] !== c) throw new SyntaxProblem(i, what);
    i++;
  };
  const str = (): string => {
    const start = i;
    expect('"', 'a string in double quotes');
    for (;;) {
      if (i >= text.length) throw new SyntaxProblem(i, 'the closing quote of a string');
      const c = text.charCodeAt(i);
      if (c === 0x22) break;
      if (c < 0x20) throw new SyntaxProblem(i, 'no control character inside a string (write \\n, \\t)');
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9A-Fa-f]{4}$/.test(text.slice(i + 2, i + 6))) throw new SyntaxProblem(i, 'four hex digits after \\u');
          i += 6;
          continue;
        }
        if (!e || !'"\\/bfnrt'.includes(e)) throw new SyntaxProblem(i, 'a valid escape (\\" \\\\ \\/ \\b \\f \\n \\r \\t \\u)');
        i += 2;
        continue;
      }
      i++;
    }
    i++;
    return JSON.parse(text.slice(start, i)) as string;
  };
  let depth = 0;
  const value = (path: string): void => {
    ws();
    const c = text[i];
    if ((c === '{' || c === '[') && depth >= MAX_JSON_DEPTH) throw new TooDeep(i);
    if (c === '{' || c === '[') depth++;
    try {
      valueIn(path, c);
    } finally {
      if (c === '{' || c === '[') depth--;
    }
  };
  const valueIn = (path: string, c: string): void => {
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
        if (text[i] !== '"') throw new SyntaxProblem(i, 'a key in double quotes');
        const key = str();
        const p = path ? `${path}.${key}` : key;
        if (seen.has(key)) {
          const where = lineCol(text, keyPos);
          problems.push({ code: 'duplicate_key', path: p, message: `the key '${key}' appears twice in one object (line ${where.line}); only one can be kept`, ...where });
        }
        seen.add(key);
        ws();
        expect(':', "':' after the key");
        value(p);
        ws();
        if (text[i] === ',') {
          i++;
          continue;
        }
        expect('}', "',' or '}'");
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
        expect(']', "',' or ']'");
        return;
      }
    }
    if (c === '"') {
      str();
      return;
    }
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, i)) {
        i += word.length;
        return;
      }
    }
    NUMBER.lastIndex = i;
    const m = NUMBER.exec(text);
    if (m && m[0].length > 0 && m[0] !== '-') {
      i += m[0].length;
      return;
    }
    throw new SyntaxProblem(i, 'a value (an object, list, string, number, true, false or null)');
  };
  value('');
  ws();
  if (i < text.length) throw new SyntaxProblem(i, 'the end of the text after the value');
}

/**
 * A value that came from somewhere other than JSON text (a message, a stored row, code) is
 * checked before validation: it must be plain JSON data, without cycles, functions or
 * class instances, and no deeper than MAX_JSON_DEPTH. Returns what is wrong, or null.
 */
export function plainJsonProblem(value: unknown): { path: string; message: string } | null {
  const ancestors = new Set<object>();
  const walk = (v: unknown, path: string, depth: number): { path: string; message: string } | null => {
    if (v === null || typeof v === 'string' || typeof v === 'boolean' || typeof v === 'number') return null;
    if (typeof v !== 'object') return { path, message: `${path || 'the document'} holds a ${typeof v}, which JSON cannot` };
    if (depth > MAX_JSON_DEPTH) return { path, message: `lists and objects are nested more than ${MAX_JSON_DEPTH} deep at ${path || 'the top'}` };
    if (ancestors.has(v)) return { path, message: `${path || 'the document'} refers back to itself (a cycle), which JSON cannot hold` };
    const proto = Object.getPrototypeOf(v);
    if (!Array.isArray(v) && proto !== Object.prototype && proto !== null) return { path, message: `${path || 'the document'} is not plain JSON data` };
    ancestors.add(v);
    try {
      if (Array.isArray(v)) {
        for (let k = 0; k < v.length; k++) {
          const r = walk(v[k], `${path}[${k}]`, depth + 1);
          if (r) return r;
        }
      } else {
        for (const [k, x] of Object.entries(v)) {
          const r = walk(x, path ? `${path}.${k}` : k, depth + 1);
          if (r) return r;
        }
      }
      return null;
    } finally {
      ancestors.delete(v);
    }
  };
  return walk(value, '', 0);
}
