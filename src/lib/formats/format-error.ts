/**
 * The one error every reader throws on bad input. It says what (`field`, and `signal` for per-signal header
 * fields) and where (`byteOffset` in the file, or `row`/`column` for text tables), so a page or the command line
 * can print one precise line instead of a stack trace.
 */
export interface FormatErrorWhere {
  /** Absolute byte offset in the file where the bad field starts; null for text tables. */
  byteOffset?: number | null;
  /** Signal label (EDF) for per-signal fields. */
  signal?: string;
  /** 1-based line number in a text table (the header row is row 1). */
  row?: number;
  /** Column name (or 1-based number when the header has none) in a text table. */
  column?: string;
}

export class FormatError extends Error {
  readonly field: string;
  readonly problem: string;
  readonly byteOffset: number | null;
  readonly signal: string | null;
  readonly row: number | null;
  readonly column: string | null;

  constructor(field: string, problem: string, where: FormatErrorWhere = {}) {
    const parts = [field];
    if (where.signal !== undefined) parts.push(`of signal "${where.signal}"`);
    if (where.row !== undefined) parts.push(`at row ${where.row}`);
    if (where.column !== undefined) parts.push(`column "${where.column}"`);
    if (where.byteOffset !== undefined && where.byteOffset !== null) parts.push(`at byte ${where.byteOffset}`);
    super(`${parts.join(' ')}: ${problem}`);
    this.name = 'FormatError';
    this.field = field;
    this.problem = problem;
    this.byteOffset = where.byteOffset ?? null;
    this.signal = where.signal ?? null;
    this.row = where.row ?? null;
    this.column = where.column ?? null;
  }
}
