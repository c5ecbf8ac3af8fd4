import type { IngestIssue } from "@/lib/ingest/errors";

/** Where an issue is, in words: `file.csv, line 12, column 3 ("temp")`. */
export function issueLocation(issue: IngestIssue): string {
  const where = [issue.file];
  if (issue.line !== null) where.push(`line ${issue.line}`);
  if (issue.column !== null) where.push(`column ${issue.column}${issue.columnName ? ` ("${issue.columnName}")` : ""}`);
  else if (issue.columnName) where.push(`field "${issue.columnName}"`);
  return where.join(", ");
}

/** Ingest and parse problems, each with file, line and column when known. */
export function IssueList({ issues, limit = 20 }: { issues: readonly IngestIssue[]; limit?: number }) {
  if (issues.length === 0) return null;
  return (
    <ul className="issue-list">
      {issues.slice(0, limit).map((issue, i) => (
        <li key={`${issue.code}-${issue.line ?? "x"}-${issue.column ?? "x"}-${i}`}>
          <strong>{issueLocation(issue)}:</strong> {issue.message}
        </li>
      ))}
      {issues.length > limit && <li>… and {issues.length - limit} more</li>}
    </ul>
  );
}
