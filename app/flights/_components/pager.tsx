import Link from "next/link";

function hrefFor(record: Record<string, string>, page: number): string {
  const params = new URLSearchParams(record);
  if (page <= 1) params.delete("page");
  else params.set("page", String(page));
  const query = params.toString();
  return query ? `/flights?${query}` : "/flights";
}

/** Previous / next links that keep every other URL parameter. */
export function Pager({ record, page, pageCount }: { record: Record<string, string>; page: number; pageCount: number }) {
  if (pageCount <= 1) return null;
  return (
    <nav className="pager" aria-label="Pages">
      {page > 1 ? <Link href={hrefFor(record, page - 1)} rel="prev">← Previous</Link> : <span aria-disabled="true">← Previous</span>}
      <span>Page {page} of {pageCount}</span>
      {page < pageCount ? <Link href={hrefFor(record, page + 1)} rel="next">Next →</Link> : <span aria-disabled="true">Next →</span>}
    </nav>
  );
}
