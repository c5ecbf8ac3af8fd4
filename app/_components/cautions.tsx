/** The cautions from the design, shown on the home page and every flight page. */
export function Cautions() {
  return (
    <aside className="cautions" aria-label="Cautions">
      <p>
        <strong>Caution.</strong> Derived stability and tropopause values are for research and teaching, not a weather
        forecast or a flight-safety decision. Balloon launches follow the local aviation authority&apos;s rules for unmanned
        free balloons; get official weather briefings and follow local codes and licensed practice.
      </p>
    </aside>
  );
}
