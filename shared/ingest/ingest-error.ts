/*
 * The one error type of shared/ingest: every refusal names the file line and column at fault (or null
 * when the fault is not in the file, e.g. a sample mass of zero), with a plain message a scientist can act on.
 */

export type IngestErrorCode =
  | "EMPTY_FILE"
  | "BINARY_FILE"
  | "NO_NUMERIC_ROWS"
  | "NO_DATA_ROWS"
  | "TOO_FEW_COLUMNS"
  | "TOO_MANY_COLUMNS"
  | "LINE_TOO_LONG"
  | "RAGGED_ROW"
  | "NOT_A_NUMBER"
  | "NOT_FINITE"
  | "MISSING_VALUE"
  | "NONPOSITIVE_TEMPERATURE"
  | "NEGATIVE_SIGMA"
  | "UNKNOWN_COLUMN"
  | "TEXT_COLUMN"
  | "UNIT_NOT_TOTAL"
  | "INVALID_SAMPLE"
  | "INVALID_ADDENDA"
  | "INVALID_FORMULA";

/** One problem, in the shape of an API error detail (`ApiErrorDetail`). */
export interface IngestIssue {
  /** 1-based file line, or null when the problem is not tied to a line. */
  line: number | null;
  /** Column name as in the header, or null when the problem is not tied to a column. */
  column: string | null;
  message: string;
}

/** A refused input. `message` already starts with "line N, column 'X': " where those are known. */
export class IngestError extends Error {
  readonly code: IngestErrorCode;
  readonly line: number | null;
  readonly column: string | null;
  /** This problem first, then further ones of the same pass (at most 20 in all). */
  readonly issues: readonly IngestIssue[];

  /**
   * @param code machine-readable reason
   * @param detail plain description without the location prefix
   * @param line 1-based file line or null
   * @param column header name or null
   * @param more further problems found in the same pass
   */
  constructor(
    code: IngestErrorCode,
    detail: string,
    line: number | null = null,
    column: string | null = null,
    more: readonly IngestIssue[] = [],
  ) {
    const message = locate(line, column) + detail;
    super(message);
    this.name = "IngestError";
    this.code = code;
    this.line = line;
    this.column = column;
    this.issues = [{ line, column, message }, ...more].slice(0, 20);
  }
}

/** "line 14, column 'Cp (uJ/K)': " style prefix. */
export function locate(line: number | null, column: string | null): string {
  const parts: string[] = [];
  if (line !== null) parts.push(`line ${line}`);
  if (column !== null) parts.push(`column '${column}'`);
  return parts.length > 0 ? parts.join(", ") + ": " : "";
}

/** Type guard usable across module copies (checks the name and code, not the prototype). */
export function isIngestError(e: unknown): e is IngestError {
  return e instanceof Error && e.name === "IngestError" && "code" in e && "issues" in e;
}
