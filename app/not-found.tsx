import Link from "next/link";

export default function NotFound() {
  return (
    <>
      <h1>Not found</h1>
      <p>There is nothing at this address, or you may not see it.</p>
      <p><Link href="/flights">Go to the archive</Link></p>
    </>
  );
}
