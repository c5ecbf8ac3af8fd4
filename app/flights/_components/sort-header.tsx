import Link from "next/link";
import type { ArchiveFilter } from "@/lib/query/archive-filter";

type Sort = ArchiveFilter["sort"];

/** Sorts a column offers: the first click uses `first`, a click on the column already sorted that way uses `second`. */
export interface SortChoice {
  first: Sort;
  second?: Sort;
}

function hrefWithSort(record: Record<string, string>, sort: Sort): string {
  const params = new URLSearchParams(record);
  params.set("sort", sort);
  params.delete("page"); // a new order starts on its first page
  return `/flights?${params.toString()}`;
}

/**
 * A column header that sorts the Archive by a click: a link to the same filter in the column's
 * order (a second click reverses it), marked with aria-sort while it is the order in use.
 */
export function SortHeader({ label, choice, current, record, className }: { label: string; choice: SortChoice; current: Sort; record: Record<string, string>; className?: string }) {
  const active = current === choice.first || current === choice.second;
  const next = current === choice.first && choice.second ? choice.second : choice.first;
  const ascending = active && /-asc$|^title$/.test(current);
  return (
    <th scope="col" className={className} aria-sort={active ? (ascending ? "ascending" : "descending") : undefined}>
      <Link className="sort-link" href={hrefWithSort(record, next)} title={`Sort by ${label.toLowerCase()}`}>
        {label}
      </Link>
    </th>
  );
}
