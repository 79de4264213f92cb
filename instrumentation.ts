/**
 * Runs once when the app server starts, before it handles a request (Next's instrumentation hook):
 * the server writes each request's TCP peer into a header of its own (`lib/http/peer.ts`).
 */
export async function register() {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { stampPeerAddress } = await import("./lib/http/peer");
    stampPeerAddress();
  }
}
