/**
 * The one error every measurement importer throws for a bad file: a readable message that names
 * the line (text files) or the field (WAV headers), so the caller can show it without a stack.
 */
export class MeasurementFileError extends Error {
  /** 1-based line of a text file, or null when the problem is not on one line. */
  readonly line: number | null;
  /** The header field of a binary file (e.g. "fmt.bitsPerSample"), or null. */
  readonly field: string | null;

  constructor(message: string, where: { line?: number; field?: string } = {}) {
    const prefix = where.line !== undefined ? `line ${where.line}: ` : where.field !== undefined ? `${where.field}: ` : '';
    super(prefix + message);
    this.name = 'MeasurementFileError';
    this.line = where.line ?? null;
    this.field = where.field ?? null;
  }
}

/** The name a measurement gets by default: the file's base name without its extension. */
export function measurementName(fileName: string): string {
  const base = fileName.split(/[\\/]/).pop() ?? fileName;
  const dot = base.lastIndexOf('.');
  const name = dot > 0 ? base.slice(0, dot) : base;
  return name === '' ? 'measurement' : name;
}
