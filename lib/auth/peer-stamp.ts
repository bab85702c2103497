import http from "node:http";
import https from "node:https";
import { PEER_HEADER } from "./client-address";

/**
 * Next.js gives pages, server actions and route handlers no documented way to read the
 * connection's address (NextRequest.ip is gone since Next 15, and Next only fills in
 * X-Forwarded-For when the client sent none, keeping a client's own copy). So, once per server
 * process, every incoming request gets PEER_HEADER set from its socket before Next sees it, and
 * any copy the client sent is replaced, so the header cannot be forged.
 */
const STAMPED = Symbol.for("twinleaf.peerStamp");

export function stampPeerAddress(): void {
  for (const proto of [http.Server.prototype, https.Server.prototype] as unknown as Record<symbol | string, unknown>[]) {
    if (proto[STAMPED]) continue;
    const emit = proto.emit as (this: unknown, event: string | symbol, ...args: unknown[]) => boolean;
    proto.emit = function (this: unknown, event: string | symbol, ...args: unknown[]) {
      if (event === "request") {
        const req = args[0] as http.IncomingMessage;
        req.headers[PEER_HEADER] = req.socket?.remoteAddress ?? "";
      }
      return emit.call(this, event, ...args);
    };
    proto[STAMPED] = true;
  }
}
