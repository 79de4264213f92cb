import ipaddr from "ipaddr.js";
import proxyaddr from "proxy-addr";

/**
 * The address a request came from, for the sign-in throttle.
 *
 * Next's server puts the TCP peer's address in X-Forwarded-For only when the request has none
 * (`??=` in next/dist/server/base-server.js), so a client that sends the header itself hides its
 * own address there, and any value in it is the client's choice. The app server therefore writes
 * the peer's address into PEER_HEADER on every request (`lib/http/peer.ts`, from
 * `instrumentation.ts`), over any copy the client sent. X-Forwarded-For counts only from proxies
 * listed in BANDCROSS_TRUSTED_PROXIES, read as Express reads it (proxy-addr): from the right, the
 * first address that is not a listed proxy. Unset, no proxy is trusted and the peer is the client.
 */
export const PEER_HEADER = "x-bandcross-peer";

/** Set by `lib/http/peer.ts` once the server writes PEER_HEADER; before that the header is a client's word. */
const STAMPING = Symbol.for("bandcross.peer-stamping");
export const peerStampingActive = () => (globalThis as Record<symbol, unknown>)[STAMPING] === true;
export const markPeerStamping = () => void ((globalThis as Record<symbol, unknown>)[STAMPING] = true);

/** BANDCROSS_TRUSTED_PROXIES: comma-separated addresses, CIDR ranges or proxy-addr's names (loopback, linklocal, uniquelocal). */
export function trustedProxyList(setting: string | undefined): string[] {
  return (setting ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
}

/** Throws with the offending entry when the setting cannot be read. */
export function checkTrustedProxies(setting: string | undefined): void {
  proxyaddr.compile(trustedProxyList(setting));
}

const compiled = new Map<string, (addr: string, i: number) => boolean>();

/**
 * The client's address as a throttle key: IPv4 as is (IPv4-mapped IPv6 read as IPv4), IPv6 by its
 * /64 prefix, since one subscriber is usually given a whole /64 (RFC 6177; common practice for
 * rate limits). Undefined when the peer is unknown.
 */
export function clientAddress(peer: string | undefined, forwardedFor: string | null | undefined, trusted: string | undefined): string | undefined {
  if (!peer) return undefined;
  const list = trustedProxyList(trusted);
  let address = peer;
  if (list.length) {
    const key = list.join(",");
    let trust = compiled.get(key);
    if (!trust) compiled.set(key, (trust = proxyaddr.compile(list)));
    const req = { connection: { remoteAddress: peer }, socket: { remoteAddress: peer }, headers: { "x-forwarded-for": forwardedFor ?? undefined } };
    address = proxyaddr(req as unknown as Parameters<typeof proxyaddr>[0], trust);
  }
  return addressKey(address);
}

export function addressKey(address: string): string {
  if (!ipaddr.isValid(address)) return address;
  const parsed = ipaddr.process(address);
  if (parsed.kind() === "ipv4") return parsed.toString();
  const parts = (parsed as ipaddr.IPv6).parts.slice(0, 4).map((p) => p.toString(16));
  return `${parts.join(":")}::/64`;
}

/** The client of a request as the app server received it (see above). */
export function clientOf(headers: Pick<Headers, "get">, trusted: string | undefined): string | undefined {
  if (!peerStampingActive()) return undefined;
  return clientAddress(headers.get(PEER_HEADER)?.trim() || undefined, headers.get("x-forwarded-for"), trusted);
}
