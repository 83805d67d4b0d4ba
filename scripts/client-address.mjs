// Who is calling, for abuse limits and the audit log: the socket's peer, unless that peer is a proxy
// listed in SLAB_TRUSTED_PROXIES, in which case the address it reports in X-Forwarded-For (walking
// right to left past every trusted hop). A header from anyone else is ignored, so a forged
// X-Forwarded-For buys no fresh tries. Plain Node (run by scripts/serve.mjs before the app loads).
import ipaddr from "ipaddr.js";

/** The header our server sets on every request (any copy the client sent is dropped first). */
export const CLIENT_HEADER = "x-slab-client";

function parse(addr) {
  try {
    const a = ipaddr.process(
      String(addr)
        .trim()
        .replace(/^\[|\]$/g, ""),
    );
    return a;
  } catch {
    return null;
  }
}

/** Parse "10.0.0.0/8, 192.168.1.7, ::1" into ranges; a bad entry throws, so a typo is found at start. */
export function parseTrustedProxies(raw) {
  return String(raw ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean)
    .map((entry) => {
      if (entry.includes("/")) {
        const [a, bits] = ipaddr.parseCIDR(entry);
        return [
          a.kind() === "ipv6" && a.isIPv4MappedAddress() ? a.toIPv4Address() : a,
          a.kind() === "ipv6" && a.isIPv4MappedAddress() ? bits - 96 : bits,
        ];
      }
      const a = parse(entry);
      if (!a) throw new Error(`SLAB_TRUSTED_PROXIES: "${entry}" is not an IP address or CIDR range`);
      return [a, a.kind() === "ipv4" ? 32 : 128];
    });
}

function trusted(addr, ranges) {
  const a = parse(addr);
  if (!a) return false;
  return ranges.some(([net, bits]) => net.kind() === a.kind() && a.match(net, bits));
}

/**
 * The client's address from the socket peer and the X-Forwarded-For header, given the trusted ranges.
 * Returns a normalised address string ("127.0.0.1", "2001:db8::1"), or "unknown".
 */
export function clientAddress(socketAddress, forwardedFor, ranges) {
  const peer = parse(socketAddress);
  if (!peer) return "unknown";
  let current = peer.toString();
  if (ranges.length === 0 || !trusted(current, ranges)) return current;
  const hops = String(forwardedFor ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  for (let i = hops.length - 1; i >= 0; i--) {
    const hop = parse(hops[i]);
    if (!hop) return current; // a garbled hop: stop at the last address we could trust
    current = hop.toString();
    if (!trusted(current, ranges)) return current;
  }
  return current;
}
