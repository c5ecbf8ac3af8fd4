import Link from "next/link";

/** Told to a viewer who sees no flight while some exist that are shared with members only. */
export function HiddenFlightsNotice({ hiddenCount }: { hiddenCount: number }) {
  return (
    <div className="notice" role="status" aria-label="Flights shared with members only">
      <p>
        <strong>{hiddenCount} flight{hiddenCount === 1 ? " is" : "s are"} shared with members only</strong> — <Link href="/account">sign in</Link> to see{" "}
        {hiddenCount === 1 ? "it" : "them"}.
      </p>
    </div>
  );
}
