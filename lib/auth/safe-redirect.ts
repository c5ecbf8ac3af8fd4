/**
 * Where to send someone after signing in: a path on this site, never another host. The check runs on the
 * normalised URL, because dot segments can turn an innocent-looking path into a protocol-relative one
 * (`/.//evil.example/x` normalises to `//evil.example/x`, which a browser reads as another host).
 */
export function safeRedirectPath(value: unknown, fallback: string): string {
  const next = typeof value === "string" ? value : "";
  if (!isLocalPath(next)) return fallback;
  const base = "http://same.invalid";
  let resolved: URL;
  try {
    resolved = new URL(next, base);
  } catch {
    return fallback;
  }
  if (resolved.origin !== base) return fallback;
  const path = `${resolved.pathname}${resolved.search}${resolved.hash}`;
  return isLocalPath(path) ? path : fallback;
}

function isLocalPath(path: string): boolean {
  // "//host" and "/\host" are protocol-relative to browsers; control characters are stripped by URL parsers.
  return path.startsWith("/") && !path.startsWith("//") && !path.includes("\\") && !/[\u0000-\u001f]/.test(path);
}
