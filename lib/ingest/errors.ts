/** One problem found in an uploaded file or its metadata, located as precisely as we can. */
export interface IngestIssue {
  code: string;
  message: string;
  file: string;
  /** 1-based line in the file, when the problem is on a line. */
  line: number | null;
  /** 1-based column (field) number, when the problem is in one field. */
  column: number | null;
  columnName: string | null;
}

/** Raised by the ingest pipeline; nothing has been written when it is thrown. */
export class IngestFailure extends Error {
  readonly issues: IngestIssue[];
  readonly code: string;
  /** Set when the same bytes were already uploaded for this school. */
  readonly existingFlightId: string | null;

  constructor(code: string, issues: IngestIssue[], existingFlightId: string | null = null) {
    super(issues.map(formatIssue).join("\n") || code);
    this.name = "IngestFailure";
    this.code = code;
    this.issues = issues;
    this.existingFlightId = existingFlightId;
  }
}

/** `file.csv, line 12, column 3 ("temp_counts"): message` */
export function formatIssue(issue: IngestIssue): string {
  const where = [issue.file];
  if (issue.line !== null) where.push(`line ${issue.line}`);
  if (issue.column !== null) where.push(`column ${issue.column}${issue.columnName ? ` ("${issue.columnName}")` : ""}`);
  else if (issue.columnName) where.push(`column "${issue.columnName}"`);
  return `${where.join(", ")}: ${issue.message}`;
}

export function fileIssue(file: string, code: string, message: string): IngestIssue {
  return { code, message, file, line: null, column: null, columnName: null };
}
