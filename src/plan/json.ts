/**
 * JSON text in for plans, profiles and coefficient exports: never throws, never recurses.
 *
 * - A UTF-8 byte order mark at the start is dropped (editors on some systems write one; RFC 8259,
 *   section 8.1, lets a parser ignore it).
 * - A syntax error is reported with its line and column (1-based), on one line, without quoting
 *   the text (a quoted newline would spread the message over several lines).
 * - Text that is not JSON only because of a bare NaN, Infinity or -Infinity (as some writers put
 *   them) is refused at that number's field path.
 * Walks over parsed values use an explicit stack: a file nested 5,000 levels deep must give an
 * error, not a stack overflow.
 */
import { PlanError } from './error';
import { junkTextProblem } from './shown-text';

export type JsonResult = { ok: true; value: unknown } | { ok: false; error: PlanError };

const BOM = '\uFEFF';

/** The text without a leading byte order mark. */
export function stripBom(text: string): string {
  return text.startsWith(BOM) ? text.slice(1) : text;
}

/** A field path for a message: a path thousands of levels deep keeps its start and end. */
export function shortPath(path: string): string {
  return path.length <= 120 ? path : `${path.slice(0, 60)}...${path.slice(-40)}`;
}

/** 1-based line and column of a character offset. */
export function lineColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text[i] === '\n') {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

/** A character for a message: printable as it is, anything else as U+XXXX. */
function shown(ch: string | undefined): string {
  if (ch === undefined) return 'end of text';
  return /^[\x21-\x7e]$/.test(ch) ? `'${ch}'` : `U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}`;
}

/** Where JSON.parse stopped: its "position N" when the engine gives one, else our own scan. */
function errorOffset(text: string, message: string): number {
  const m = /position (\d+)/.exec(message);
  if (m) return Number(m[1]);
  return firstSyntaxError(text);
}

const NUMBER = /-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/y;
const LITERAL = /true|false|null/y;

/**
 * The offset of the first character that cannot continue a JSON text (RFC 8259 grammar), or
 * text.length for text that ends too soon; -1 when the text is valid. An explicit stack of open
 * containers, no recursion.
 */
export function firstSyntaxError(text: string): number {
  const stack: ('{' | '[')[] = [];
  // What may come next: a value, an object key (or '}' right after '{'), ':' , or ',' / a closer.
  let expect: 'value' | 'key' | 'first-key' | 'first-value' | 'colon' | 'after' = 'value';
  let i = 0;
  const ws = () => {
    while (i < text.length && ' \t\n\r'.includes(text[i])) i++;
  };
  const string = (): boolean => {
    i++;
    while (i < text.length) {
      const c = text.charCodeAt(i);
      if (c === 0x22) {
        i++;
        return true;
      }
      if (c < 0x20) return false;
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return false;
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else return false;
      } else i++;
    }
    return false;
  };
  for (;;) {
    ws();
    if (i >= text.length) return expect === 'after' && stack.length === 0 ? -1 : text.length;
    const c = text[i];
    if (expect === 'value' || expect === 'first-value') {
      if (c === ']' && expect === 'first-value') {
        stack.pop();
        i++;
        expect = 'after';
      } else if (c === '{' || c === '[') {
        stack.push(c);
        i++;
        expect = c === '{' ? 'first-key' : 'first-value';
      } else if (c === '"') {
        if (!string()) return i >= text.length ? text.length : i;
        expect = 'after';
      } else {
        NUMBER.lastIndex = i;
        LITERAL.lastIndex = i;
        const m = NUMBER.exec(text) ?? LITERAL.exec(text);
        if (!m || m.index !== i) return i;
        i += m[0].length;
        expect = 'after';
      }
    } else if (expect === 'key' || expect === 'first-key') {
      if (c === '}' && expect === 'first-key') {
        stack.pop();
        i++;
        expect = 'after';
      } else if (c === '"') {
        if (!string()) return i >= text.length ? text.length : i;
        expect = 'colon';
      } else return i;
    } else if (expect === 'colon') {
      if (c !== ':') return i;
      i++;
      expect = 'value';
    } else {
      const top = stack[stack.length - 1];
      if (top === undefined) return i;
      if (c === ',') {
        i++;
        expect = top === '{' ? 'key' : 'value';
      } else if ((c === '}' && top === '{') || (c === ']' && top === '[')) {
        stack.pop();
        i++;
        expect = 'after';
      } else return i;
    }
  }
}

export function parseJsonText(raw: string): JsonResult {
  const text = stripBom(raw);
  try {
    return { ok: true, value: JSON.parse(text) };
  } catch (e) {
    const bare = bareNonFiniteNumber(text);
    if (bare) return { ok: false, error: new PlanError(shortPath(bare.path), `must be a finite number, not ${bare.token} (not valid JSON either)`) };
    // An empty file, an image or archive, or prose: say what it is, never quote its bytes.
    const junk = junkTextProblem(text);
    if (junk) return { ok: false, error: new PlanError('', junk) };
    const offset = errorOffset(text, (e as Error).message);
    if (offset < 0) return { ok: false, error: new PlanError('', 'not valid JSON') };
    const { line, column } = lineColumn(text, offset);
    const what = offset >= text.length ? 'unexpected end of text' : `unexpected ${shown(text[offset])}`;
    return { ok: false, error: new PlanError('', `not valid JSON at line ${line}, column ${column} (${what})`) };
  }
}

/**
 * Where text that is not JSON only because of a bare NaN, Infinity or -Infinity holds the first
 * such token: its field path (`outputs[0].bands[1].q`, in the reader's notation) and the token;
 * null when that is not the reason.
 */
export function bareNonFiniteNumber(text: string): { path: string; token: string } | null {
  const MARK = '\u0000nonfinite:';
  let out = '';
  let found = false;
  for (let i = 0; i < text.length; ) {
    const ch = text[i];
    if (ch === '"') {
      // copy a string literal as it is
      let j = i + 1;
      while (j < text.length && text[j] !== '"') j += text[j] === '\\' ? 2 : 1;
      out += text.slice(i, j + 1);
      i = j + 1;
      continue;
    }
    const m = /^(-?Infinity|NaN)(?![A-Za-z0-9_])/.exec(text.slice(i, i + 10));
    if (m && !/[A-Za-z0-9_.]/.test(text[i - 1] ?? '')) {
      out += JSON.stringify(MARK + m[1]);
      i += m[1].length;
      found = true;
      continue;
    }
    out += ch;
    i++;
  }
  if (!found) return null;
  let value: unknown;
  try {
    value = JSON.parse(out);
  } catch {
    return null;
  }
  // Depth-first, in document order, with an explicit stack.
  const stack: { v: unknown; path: string }[] = [{ v: value, path: '' }];
  while (stack.length > 0) {
    const { v, path } = stack.pop()!;
    if (typeof v === 'string') {
      if (v.startsWith(MARK)) return { path, token: v.slice(MARK.length) };
    } else if (Array.isArray(v)) {
      for (let k = v.length - 1; k >= 0; k--) stack.push({ v: v[k], path: `${path}[${k}]` });
    } else if (typeof v === 'object' && v !== null) {
      const entries = Object.entries(v);
      for (let k = entries.length - 1; k >= 0; k--) stack.push({ v: entries[k][1], path: path ? `${path}.${entries[k][0]}` : entries[k][0] });
    }
  }
  return null;
}
