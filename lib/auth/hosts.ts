/**
 * Which host names the app signs people in under. The browser is always sent on to paths on the
 * host it came by (never to an absolute address built from configuration), and only the names
 * listed here are honoured: a page served under a name the lab did not choose (a look-alike or
 * rebinding domain, or a proxy passing on the client's Host) gets an explanation instead of a
 * session. The list is BANDCROSS_TRUSTED_HOSTS (comma-separated, `name` for any port or
 * `name:port`), plus the host of APP_URL; unset, it is localhost, 127.0.0.1 and [::1].
 */

export const LOCAL_HOSTS = ["localhost", "127.0.0.1", "[::1]"];

interface HostPattern {
  hostname: string;
  /** Empty: any port. */
  port: string;
}

function parseHost(value: string): HostPattern | null {
  const v = value.trim().toLowerCase();
  if (!v || /[\s/?#@\\]/.test(v)) return null;
  try {
    const url = new URL(`http://${v}`);
    return { hostname: url.hostname, port: url.port };
  } catch {
    return null;
  }
}

/** The trusted names from the setting and the public address. */
export function trustedHosts(setting: string | undefined, appUrl: string): HostPattern[] {
  const listed = setting?.trim() ? setting.split(",") : LOCAL_HOSTS;
  const patterns = listed.map(parseHost).filter((p): p is HostPattern => p !== null);
  const app = new URL(appUrl);
  patterns.push({ hostname: app.hostname.toLowerCase(), port: app.port });
  return patterns;
}

/** The host the browser used: a proxy's X-Forwarded-Host (its first entry) or else Host. */
export function requestHost(headers: Pick<Headers, "get">): string {
  return (headers.get("x-forwarded-host")?.split(",")[0] ?? headers.get("host") ?? "").trim();
}

export function isTrustedHost(host: string, trusted: HostPattern[]): boolean {
  const h = parseHost(host);
  if (!h) return false;
  return trusted.some((t) => t.hostname === h.hostname && (t.port === "" || t.port === h.port));
}
