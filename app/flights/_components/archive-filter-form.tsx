import Link from "next/link";

interface Option {
  id: string;
  name: string;
}

const SEASONS = [
  { value: "", label: "Any season" },
  { value: "DJF", label: "DJF (Dec–Feb)" },
  { value: "MAM", label: "MAM (Mar–May)" },
  { value: "JJA", label: "JJA (Jun–Aug)" },
  { value: "SON", label: "SON (Sep–Nov)" },
  { value: "winter", label: "Winter at the site (DJF north, JJA south)" },
  { value: "spring", label: "Spring at the site (MAM north, SON south)" },
  { value: "summer", label: "Summer at the site (JJA north, DJF south)" },
  { value: "autumn", label: "Autumn at the site (SON north, MAM south)" },
];

const SORTS = [
  { value: "launch-desc", label: "Launch time, newest first" },
  { value: "launch-asc", label: "Launch time, oldest first" },
  { value: "tropopause-desc", label: "Tropopause, highest first" },
  { value: "tropopause-asc", label: "Tropopause, lowest first" },
  { value: "lapse-desc", label: "Lapse rate, steepest first" },
  { value: "lapse-asc", label: "Lapse rate, least steep first" },
  { value: "title", label: "Title A–Z" },
];

const PAGE_SIZES = ["10", "25", "50", "100", "200"];

/** The offered page sizes, with the size in use among them (a link may ask for any size up to 200). */
function pageSizeChoices(inUse: string | undefined): string[] {
  if (inUse === undefined || PAGE_SIZES.includes(inUse)) return PAGE_SIZES;
  return [...PAGE_SIZES, inUse].sort((a, b) => Number(a) - Number(b));
}

/** A plain GET form: every filter lives in the URL, so a filtered archive can be bookmarked and shared. */
export function ArchiveFilterForm({ values, schools, sites }: { values: Record<string, string>; schools: Option[]; sites: Array<Option & { schoolId: string }> }) {
  return (
    <form className="filters" method="get" action="/flights" aria-label="Filter the archive">
      <div className="field">
        <label htmlFor="f-school">School</label>
        <select id="f-school" name="school" defaultValue={values.school ?? ""}>
          <option value="">Any school</option>
          {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
        </select>
      </div>
      <div className="field">
        <label htmlFor="f-site">Site</label>
        <select id="f-site" name="site" defaultValue={values.site ?? ""}>
          <option value="">Any site</option>
          {schools.map((school) => {
            const own = sites.filter((site) => site.schoolId === school.id);
            return own.length === 0 ? null : (
              <optgroup key={school.id} label={school.name}>
                {own.map((site) => <option key={site.id} value={site.id}>{site.name}</option>)}
              </optgroup>
            );
          })}
        </select>
      </div>
      <div className="field">
        <label htmlFor="f-from">Launch date from (UTC)</label>
        <input id="f-from" type="date" name="from" defaultValue={values.from ?? ""} />
      </div>
      <div className="field">
        <label htmlFor="f-to">Launch date to (UTC, inclusive)</label>
        <input id="f-to" type="date" name="to" defaultValue={values.to ?? ""} />
      </div>
      <div className="field">
        <label htmlFor="f-season">Season</label>
        <select id="f-season" name="season" defaultValue={values.season ?? ""}>
          {SEASONS.map((s) => <option key={s.value} value={s.value}>{s.label}</option>)}
        </select>
      </div>
      <div className="field">
        <label htmlFor="f-sort">Sort by</label>
        <select id="f-sort" name="sort" defaultValue={values.sort ?? "launch-desc"}>
          {SORTS.map((s) => <option key={s.value} value={s.value}>{s.label}</option>)}
        </select>
      </div>
      <div className="field">
        <label htmlFor="f-size">Rows per page</label>
        <select id="f-size" name="pageSize" defaultValue={values.pageSize ?? "25"}>
          {pageSizeChoices(values.pageSize).map((n) => <option key={n} value={n}>{n}</option>)}
        </select>
      </div>
      <div className="actions">
        <button type="submit">Apply</button>
        <Link href="/flights">Clear</Link>
      </div>
    </form>
  );
}
