import Link from "next/link";

/** "All schools · School A · School B" links that set `?school=` on a Setup list. */
export function SchoolFilterLinks({ path, schools, current }: { path: string; schools: Array<{ id: string; name: string }>; current: string | undefined }) {
  return (
    <p className="small" aria-label="Filter by school">
      {current ? <Link href={path}>All schools</Link> : <strong>All schools</strong>}
      {schools.map((s) => (
        <span key={s.id}> · {current === s.id ? <strong>{s.name}</strong> : <Link href={`${path}?school=${s.id}`}>{s.name}</Link>}</span>
      ))}
    </p>
  );
}
