/** Rules for ids: the pattern, and the words an id may not be. */

export const ID_PATTERN = /^[A-Za-z_][A-Za-z0-9_]*$/;

const RESERVED_WORDS = [
  // symbols of the expression language
  't', 'pi', 'e', 'i', 'Infinity', 'NaN', 'true', 'false', 'null', 'undefined',
  // operator words of the expression language (mathjs)
  'mod', 'to', 'in', 'and', 'or', 'not', 'xor',
  // allowed functions
  'exp', 'log', 'log10', 'sqrt', 'abs', 'min', 'max', 'pow', 'sin', 'cos', 'tanh', 'floor', 'ceil',
  'monod', 'inhibit', 'hill',
  // JavaScript reserved words
  'break', 'case', 'catch', 'class', 'const', 'continue', 'debugger', 'default', 'delete', 'do',
  'else', 'enum', 'export', 'extends', 'finally', 'for', 'function', 'if', 'import',
  'instanceof', 'new', 'return', 'super', 'switch', 'this', 'throw', 'try', 'typeof', 'var',
  'void', 'while', 'with', 'yield', 'let', 'static', 'implements', 'interface', 'package',
  'private', 'protected', 'public', 'await', 'arguments', 'eval',
  // object machinery
  '__proto__', 'constructor', 'prototype'
];

export const RESERVED: ReadonlySet<string> = new Set(RESERVED_WORDS);

/** Why `id` is not a valid id, or null when it is. */
export function idProblem(id: unknown): string | null {
  if (typeof id !== 'string') return `the id must be a string, got ${describe(id)}`;
  if (!ID_PATTERN.test(id)) {
    return `invalid id '${id}': use letters, digits and _ , starting with a letter or _`;
  }
  if (RESERVED.has(id)) return `'${id}' is a reserved word and cannot be an id`;
  return null;
}

export function describe(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'string') return `the text '${v.length > 40 ? v.slice(0, 40) + '…' : v}'`;
  if (typeof v === 'number') return String(v);
  return typeof v;
}

/** A value as it stands in a message: strings quoted, others described. */
export function quote(v: unknown): string {
  return typeof v === 'string' ? `'${v.length > 40 ? v.slice(0, 40) + '…' : v}'` : describe(v);
}
