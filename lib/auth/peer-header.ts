import http from 'node:http';
import { PEER_HEADER } from './client-address';

// Route handlers see headers but not the socket (and Next keeps a client-sent X-Forwarded-For as it is), so the
// server stamps each incoming request with its TCP peer address before Next reads it. A client-sent header of
// that name is overwritten.
let installed = false;
export function installPeerHeader() {
  if (installed) return;
  installed = true;
  const emit = http.Server.prototype.emit;
  http.Server.prototype.emit = function patchedEmit(this: http.Server, event: string, ...args: unknown[]) {
    if (event === 'request') {
      const req = args[0] as http.IncomingMessage;
      req.headers[PEER_HEADER] = req.socket?.remoteAddress ?? '';
    }
    return (emit as (...a: unknown[]) => boolean).apply(this, [event, ...args]);
  } as typeof http.Server.prototype.emit;
}
