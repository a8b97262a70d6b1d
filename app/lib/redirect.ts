/**
 * Where to go after signing in: only a path on this app's own origin. The value is resolved the
 * way a browser resolves a Location header (`new URL(value, appUrl)`: backslashes become slashes,
 * tabs and newlines vanish, `//host` is another host), and anything that leaves the origin, or
 * that would read as protocol-relative once sent back (`//…`), falls back.
 */
export function sameOriginPath(value: unknown, appUrl: string, fallback = "/"): string {
  if (typeof value !== "string" || value.length === 0 || value.length > 2048) return fallback;
  // Only paths: not "https://…", "javascript:…", "host/…" or "?x".
  if (!value.startsWith("/")) return fallback;
  let base: URL;
  let url: URL;
  try {
    base = new URL(appUrl);
    url = new URL(value, base);
  } catch {
    return fallback;
  }
  if (url.origin !== base.origin) return fallback;
  const path = url.pathname + url.search + url.hash;
  if (!path.startsWith("/") || path.startsWith("//") || path.startsWith("/\\")) return fallback;
  return path;
}
