/**
 * Text from a file, as an error message may show it. A file that is not what it claims (an image,
 * an archive, a document renamed to .bqplan) holds control characters and undecodable bytes; an
 * error must say where the problem is and what kind of file it looks like, never print those bytes.
 * Where a JSON text breaks (line and column) is `parseJsonText` in json.ts, which calls
 * `junkTextProblem` first.
 */

/** True when `text` looks like binary data rather than text (NUL, other control characters, U+FFFD). */
export function looksBinary(text: string): boolean {
  const head = text.slice(0, 4096);
  // Tab, line feed, carriage return and form feed are text; other C0 controls and U+FFFD are not.
  return /[\u0000-\u0008\u000b\u000e-\u001f\ufffd]/.test(head);
}

/** A token for a message: quoted when it is short printable text, else described without its bytes. */
export function shownToken(token: string, max = 24): string {
  if (looksBinary(token) || /[\u007f-\u009f]/.test(token)) return 'unreadable characters';
  return JSON.stringify(token.length > max ? `${token.slice(0, max)}...` : token);
}

/**
 * Why `text` cannot be JSON at all, before any parser position means anything: an empty file,
 * binary data, or text that does not start like JSON. Null when none of these holds.
 */
export function junkTextProblem(text: string): string | null {
  if (text.trim() === '') return 'the file is empty';
  if (looksBinary(text)) return 'this is binary data, not a text file';
  const first = text.trimStart()[0];
  if (first !== '{' && first !== '[') return 'not valid JSON: it does not start with "{"';
  return null;
}
