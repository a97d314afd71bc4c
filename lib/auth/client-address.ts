import { BlockList, isIP } from 'node:net';

// The client address for sign-in limits. The TCP peer is the only address a client cannot choose; the server
// copies it into PEER_HEADER on every request (lib/auth/peer-header.ts, installed from instrumentation.ts),
// overwriting anything a client sent under that name. X-Forwarded-For is read only when the peer is one of
// TRUSTED_PROXIES (comma-separated addresses or CIDR blocks), and then from the right: the first entry that is
// not itself a trusted proxy is the client.
export const PEER_HEADER = 'x-anodyne-peer';

type HeaderBag = Headers | Record<string, string | string[] | undefined> | undefined;

function header(headers: HeaderBag, name: string): string | undefined {
  if (!headers) return undefined;
  if (headers instanceof Headers) return headers.get(name) ?? undefined;
  const v = headers[name];
  return Array.isArray(v) ? v.join(',') : v;
}

function normalise(addr: string): string {
  const a = addr.trim().replace(/^\[|\]$/g, '');
  return a.startsWith('::ffff:') && isIP(a.slice(7)) === 4 ? a.slice(7) : a;
}

export function parseTrustedProxies(spec: string | undefined): BlockList {
  const list = new BlockList();
  for (const raw of (spec ?? '').split(',').map((s) => s.trim()).filter(Boolean)) {
    const [addr, bits] = raw.split('/');
    const ip = normalise(addr!);
    const family = isIP(ip);
    if (!family) throw new Error(`TRUSTED_PROXIES: "${raw}" is not an IP address or CIDR block`);
    const type = family === 6 ? 'ipv6' : 'ipv4';
    if (bits !== undefined) list.addSubnet(ip, Number(bits), type);
    else list.addAddress(ip, type);
  }
  return list;
}

function trusted(list: BlockList, addr: string): boolean {
  const family = isIP(addr);
  return family !== 0 && list.check(addr, family === 6 ? 'ipv6' : 'ipv4');
}

let cached: { spec: string | undefined; list: BlockList } | null = null;
function trustedProxies(): BlockList {
  const spec = process.env.TRUSTED_PROXIES;
  if (!cached || cached.spec !== spec) cached = { spec, list: parseTrustedProxies(spec) };
  return cached.list;
}

export function clientAddress(headers: HeaderBag, proxies: BlockList = trustedProxies()): string | null {
  const peerRaw = header(headers, PEER_HEADER);
  if (!peerRaw) return null;
  const peer = normalise(peerRaw);
  if (!trusted(proxies, peer)) return peer;
  const hops = (header(headers, 'x-forwarded-for') ?? '').split(',').map(normalise).filter((h) => isIP(h));
  for (let i = hops.length - 1; i >= 0; i--) if (!trusted(proxies, hops[i]!)) return hops[i]!;
  return hops[0] ?? peer;
}
