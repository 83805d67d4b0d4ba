import { describe, expect, it } from "vitest";
import { clientAddress, parseTrustedProxies } from "./client-address.mjs";

// ASVS 4.0 V2.2.1 / V7.1.x: abuse limits and the audit log key on an address the client cannot forge.
describe("clientAddress", () => {
  const none = parseTrustedProxies("");
  const lb = parseTrustedProxies("10.0.0.0/8, 192.168.1.7, ::1");
  const cases: [string, string | undefined, ReturnType<typeof parseTrustedProxies>, string][] = [
    ["203.0.113.9", "1.2.3.4", none, "203.0.113.9"], // no proxies trusted: the header is ignored
    ["::ffff:127.0.0.1", "1.2.3.4", none, "127.0.0.1"], // IPv4-mapped peers are read as IPv4
    ["10.1.2.3", "198.51.100.7", lb, "198.51.100.7"], // a trusted proxy reports the client
    ["10.1.2.3", "198.51.100.7, 10.9.9.9", lb, "198.51.100.7"], // past every trusted hop
    ["10.1.2.3", "6.6.6.6, 198.51.100.7", lb, "198.51.100.7"], // a client-written left part is not believed
    ["192.168.1.8", "198.51.100.7", lb, "192.168.1.8"], // a peer not listed is the client
    ["::1", "2001:db8::5", lb, "2001:db8::5"],
    ["10.1.2.3", undefined, lb, "10.1.2.3"],
    ["10.1.2.3", "not-an-address", lb, "10.1.2.3"],
    ["garbage", "1.2.3.4", lb, "unknown"],
  ];
  it.each(cases)("peer %s, X-Forwarded-For %s", (peer, xff, ranges, want) => {
    expect(clientAddress(peer, xff, ranges)).toBe(want);
  });
  it("refuses a malformed trusted-proxy list at start", () => {
    expect(() => parseTrustedProxies("10.0.0.0/8, proxy.local")).toThrow(/SLAB_TRUSTED_PROXIES/);
  });
});
