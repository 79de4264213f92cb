import http from "node:http";
import { markPeerStamping, PEER_HEADER } from "@/lib/auth/client";

/**
 * Writes each request's TCP peer address into PEER_HEADER, over any value the client sent, before
 * Next sees the request (`lib/auth/client.ts` says why). Next 15 removed `request.ip`, and
 * `next start` offers no hook into its HTTP server, so this wraps `http.Server`'s `emit` for
 * "request" events once, from `instrumentation.ts`'s `register`, which Next runs before it
 * handles any request.
 */
export function stampPeerAddress(): void {
  const proto = http.Server.prototype as http.Server & { [stamped]?: true };
  if (proto[stamped]) return;
  const emit = proto.emit;
  proto.emit = function (this: http.Server, event: string | symbol, ...args: unknown[]) {
    if (event === "request") {
      const req = args[0] as http.IncomingMessage;
      req.headers[PEER_HEADER] = req.socket?.remoteAddress ?? "";
    }
    return (emit as (this: http.Server, ...a: unknown[]) => boolean).call(this, event, ...args);
  } as typeof emit;
  proto[stamped] = true;
  markPeerStamping();
}

const stamped = Symbol.for("bandcross.peer-stamped");
