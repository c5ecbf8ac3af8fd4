import Link from "next/link";

export default function FlightNotFound() {
  return (
    <>
      <h1>Flight not found</h1>
      <p>No flight has this address, or it is not shared with you.</p>
      <p><Link href="/flights">Back to the archive</Link></p>
    </>
  );
}
