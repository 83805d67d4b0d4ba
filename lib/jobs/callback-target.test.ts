import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { addressVerdict, allowedHosts, pinnedLookup, postToTarget, resolveCallback, type Resolver } from "./callback-target";

// SSRF (server-side request forgery) guard of the webhook callbacks.
// ASVS 4.0 V12.6.1 (the server accepts only an allow-list of destinations it calls) and
// V5.2.6 (untrusted URLs are checked against an allow-list of protocols, domains, paths and ports).

/** A resolver that answers from a table, counting its calls. */
function fakeResolver(answers: Record<string, string[][]>): Resolver & { calls: number } {
  const seen = new Map<string, number>();
  const r = (async (host: string) => {
    r.calls++;
    const n = seen.get(host) ?? 0;
    seen.set(host, n + 1);
    const list = answers[host] ?? [];
    const pick = list[Math.min(n, list.length - 1)] ?? [];
    return pick.map((address) => ({ address, family: address.includes(":") ? 6 : 4 }));
  }) as Resolver & { calls: number };
  r.calls = 0;
  return r;
}

// [URL as a client may send it, the host WHATWG URL makes of it, verdict: "ok" or the refusal's reason]
const table: [string, string, string][] = [
  // IPv4 in its spellings; URL parsing gives the dotted quad (WHATWG URL Standard, "IPv4 parser").
  ["http://127.0.0.1/", "127.0.0.1", "loopback"],
  ["http://2130706433/", "127.0.0.1", "loopback"],
  ["http://0x7f.1/", "127.0.0.1", "loopback"],
  ["http://127.1/", "127.0.0.1", "loopback"],
  ["http://0177.0.0.1/", "127.0.0.1", "loopback"],
  ["http://017700000001/", "127.0.0.1", "loopback"],
  ["http://0x7f000002/", "127.0.0.2", "loopback"],
  ["http://0.0.0.0/", "0.0.0.0", "unspecified"],
  ["http://0/", "0.0.0.0", "unspecified"],
  ["http://0.1.2.3/", "0.1.2.3", "unspecified"], // 0.0.0.0/8, "this network"
  ["http://10.1.2.3/", "10.1.2.3", "private"],
  ["http://172.16.0.1/", "172.16.0.1", "private"],
  ["http://172.31.255.254/", "172.31.255.254", "private"],
  ["http://192.168.1.1/", "192.168.1.1", "private"],
  ["http://169.254.169.254/latest/meta-data/", "169.254.169.254", "linkLocal"], // cloud metadata
  ["http://100.64.0.1/", "100.64.0.1", "carrierGradeNat"],
  ["http://224.0.0.1/", "224.0.0.1", "multicast"],
  ["http://239.255.255.250/", "239.255.255.250", "multicast"],
  ["http://255.255.255.255/", "255.255.255.255", "broadcast"],
  ["http://240.0.0.1/", "240.0.0.1", "reserved"],
  ["http://198.18.0.1/", "198.18.0.1", "reserved"], // benchmarking 198.18.0.0/15 (RFC 2544)
  ["http://198.19.255.1/", "198.19.255.1", "reserved"],
  ["http://192.0.2.10/", "192.0.2.10", "reserved"], // documentation (RFC 5737)
  ["http://198.51.100.7/", "198.51.100.7", "reserved"],
  ["http://203.0.113.9/", "203.0.113.9", "reserved"],
  ["http://192.0.0.8/", "192.0.0.8", "reserved"], // IETF protocol assignments
  ["http://8.8.8.8/", "8.8.8.8", "ok"],
  ["https://93.184.215.14:8443/hook", "93.184.215.14", "ok"],
  ["http://172.32.0.1/", "172.32.0.1", "ok"], // just outside 172.16.0.0/12
  // IPv6, and IPv6 forms that carry an IPv4 address.
  ["http://[::1]/", "::1", "loopback"],
  ["http://[::]/", "::", "unspecified"],
  ["http://[::ffff:7f00:1]/", "::ffff:7f00:1", "loopback"],
  ["http://[::ffff:127.0.0.1]/", "::ffff:7f00:1", "loopback"],
  ["http://[::127.0.0.1]/", "::7f00:1", "loopback"], // IPv4-compatible
  ["http://[::8.8.8.8]/", "::808:808", "ipv4Compatible"], // deprecated form: refused even when the inside is global
  ["http://[::ffff:a9fe:a9fe]/", "::ffff:a9fe:a9fe", "linkLocal"], // metadata, mapped
  ["http://[::ffff:10.0.0.1]/", "::ffff:a00:1", "private"],
  ["http://[::ffff:0:7f00:1]/", "::ffff:0:7f00:1", "loopback"], // IPv4-translated (RFC 6145)
  ["http://[64:ff9b::7f00:1]/", "64:ff9b::7f00:1", "loopback"], // NAT64 (RFC 6052)
  ["http://[64:ff9b::a9fe:a9fe]/", "64:ff9b::a9fe:a9fe", "linkLocal"],
  ["http://[64:ff9b:1::808:808]/", "64:ff9b:1::808:808", "localNat64"],
  ["http://[2002:7f00:1::1]/", "2002:7f00:1::1", "loopback"], // 6to4 around 127.0.0.1
  ["http://[2002:c0a8:101::1]/", "2002:c0a8:101::1", "private"], // 6to4 around 192.168.1.1
  ["http://[2001:0:4136:e378:8000:63bf:80ff:fffe]/", "2001:0:4136:e378:8000:63bf:80ff:fffe", "loopback"], // Teredo, client ~80ff:fffe = 127.0.0.1
  ["http://[2001:0:a00:1::]/", "2001:0:a00:1::", "private"], // Teredo with a private server
  ["http://[fe80::1]/", "fe80::1", "linkLocal"],
  ["http://[fe90::1]/", "fe90::1", "linkLocal"],
  ["http://[febf::1]/", "febf::1", "linkLocal"],
  ["http://[fec0::1]/", "fec0::1", "deprecatedSiteLocal"],
  ["http://[fc00::1]/", "fc00::1", "uniqueLocal"],
  ["http://[fd12:3456::1]/", "fd12:3456::1", "uniqueLocal"],
  ["http://[ff02::1]/", "ff02::1", "multicast"],
  ["http://[100::1]/", "100::1", "discard"],
  ["http://[2001:db8::1]/", "2001:db8::1", "reserved"], // documentation (RFC 3849)
  ["http://[2001:2::1]/", "2001:2::1", "benchmarking"],
  ["http://[4000::1]/", "4000::1", "notGlobal"], // outside 2000::/3
  ["http://[2606:4700:4700::1111]/", "2606:4700:4700::1111", "ok"],
  ["http://[::ffff:8.8.8.8]/", "::ffff:808:808", "ok"], // mapped form of a global address
  ["http://[64:ff9b::808:808]/", "64:ff9b::808:808", "ok"], // NAT64 of a global address
  ["http://[2002:808:808::1]/", "2002:808:808::1", "ok"], // 6to4 of a global address
];

describe("callback address verdicts (ASVS 4.0 V12.6.1, V5.2.6)", () => {
  it("holds at least 30 forms", () => expect(table.length).toBeGreaterThanOrEqual(30));

  it.each(table)("%s → host %s → %s", async (raw, host, verdict) => {
    const url = new URL(raw);
    expect(url.hostname.replace(/^\[|\]$/g, "")).toBe(host);
    const v = addressVerdict(host);
    expect(v.ok ? "ok" : v.reason).toBe(verdict);
    // The URL check agrees, without any name resolution for an address literal.
    const resolver = fakeResolver({});
    const r = await resolveCallback(raw, { resolver });
    expect(r.ok ? "ok" : r.refusal.reason).toBe(verdict);
    expect(resolver.calls).toBe(0);
    if (!r.ok) expect(r.refusal).toMatchObject({ code: "invalid_callback", address: host });
    if (r.ok) expect(r.target.address).toBe(host);
  });

  it("refuses what is not an http(s) URL", async () => {
    for (const [raw, reason] of [
      ["not a url", "notAUrl"],
      ["ftp://8.8.8.8/", "scheme"],
      ["file:///etc/passwd", "scheme"],
      ["gopher://8.8.8.8/", "scheme"],
    ] as const) {
      const r = await resolveCallback(raw, { resolver: fakeResolver({}) });
      expect(r.ok ? "ok" : r.refusal.reason).toBe(reason);
    }
  });

  it("judges every address a name resolves to, and refuses a name that does not resolve", async () => {
    const resolver = fakeResolver({
      "hooks.shop.test": [["8.8.4.4", "2606:4700:4700::1001"]],
      "mixed.shop.test": [["8.8.4.4", "10.0.0.5"]],
      "mapped.shop.test": [["::ffff:127.0.0.1"]],
      "gone.shop.test": [[]],
    });
    const ok = await resolveCallback("https://hooks.shop.test/slab", { resolver });
    expect(ok.ok && ok.target).toMatchObject({ host: "hooks.shop.test", address: "8.8.4.4", family: 4, listed: false });
    const mixed = await resolveCallback("https://mixed.shop.test/slab", { resolver });
    expect(mixed.ok ? "ok" : mixed.refusal).toMatchObject({ reason: "private", address: "10.0.0.5" });
    expect(mixed.ok ? "" : mixed.refusal.message).toMatch(/mixed\.shop\.test resolves to 10\.0\.0\.5/);
    const mapped = await resolveCallback("https://mapped.shop.test/slab", { resolver });
    expect(mapped.ok ? "ok" : mapped.refusal.reason).toBe("loopback");
    const gone = await resolveCallback("https://gone.shop.test/slab", { resolver });
    expect(gone.ok ? "ok" : gone.refusal.reason).toBe("unresolved");
  });

  it("lets a host on the allow-list through (an explicit exception), and only that host", async () => {
    const allowHosts = ["127.0.0.1", "localhost"];
    const resolver = fakeResolver({ localhost: [["127.0.0.1"]] });
    expect((await resolveCallback("http://127.0.0.1:4000/hook", { resolver, allowHosts })).ok).toBe(true);
    expect((await resolveCallback("http://localhost:4000/hook", { resolver, allowHosts })).ok).toBe(true);
    for (const other of ["http://127.0.0.2/", "http://[::1]/", "http://[::ffff:7f00:1]/", "http://0.0.0.0/"]) {
      expect((await resolveCallback(other, { resolver, allowHosts })).ok).toBe(false);
    }
  });
});

describe("the allow-list of SLAB_WEBHOOK_ALLOW_HOSTS (ASVS 4.0 V12.6.1)", () => {
  it("is read as lower-case hosts, brackets dropped", () => {
    expect(allowedHosts({ SLAB_WEBHOOK_ALLOW_HOSTS: " 127.0.0.1, LocalHost ,[::1],", NODE_ENV: "test" })).toEqual([
      "127.0.0.1",
      "localhost",
      "::1",
    ]);
  });
  it("is ignored in production unless SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION=1", () => {
    expect(allowedHosts({ SLAB_WEBHOOK_ALLOW_HOSTS: "127.0.0.1", NODE_ENV: "production" })).toEqual([]);
    expect(
      allowedHosts({ SLAB_WEBHOOK_ALLOW_HOSTS: "127.0.0.1", NODE_ENV: "production", SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION: "true" }),
    ).toEqual([]);
    expect(
      allowedHosts({ SLAB_WEBHOOK_ALLOW_HOSTS: "127.0.0.1", NODE_ENV: "production", SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION: "1" }),
    ).toEqual(["127.0.0.1"]);
    expect(allowedHosts({ NODE_ENV: "test" })).toEqual([]);
  });
});

describe("DNS rebinding: the connection goes to the address that was checked (ASVS 4.0 V12.6.1)", () => {
  let server: http.Server;
  let port = 0;
  const got: { host?: string; body: string }[] = [];
  beforeAll(async () => {
    server = http.createServer((req, res) => {
      let body = "";
      req.on("data", (c) => (body += c));
      req.on("end", () => {
        got.push({ host: req.headers.host, body });
        res.writeHead(204).end();
      });
    });
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
    port = (server.address() as AddressInfo).port;
  });
  afterAll(() => new Promise<void>((r) => server.close(() => r())));

  it("a public first answer is pinned: the second (loopback) answer is never asked for nor used", async () => {
    const resolver = fakeResolver({ "rebind.shop.test": [["8.8.8.8"], ["127.0.0.1"]] });
    const r = await resolveCallback(`http://rebind.shop.test:${port}/hook`, { resolver });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.target).toMatchObject({ address: "8.8.8.8", family: 4 });
    // Whatever name the HTTP client asks the pinned lookup for, in either of Node's call forms, it gets the checked address.
    const lookup = pinnedLookup(r.target);
    const single = await new Promise<[unknown, unknown]>((res) => lookup("rebind.shop.test", { family: 0 }, (_e, a, f) => res([a, f])));
    expect(single).toEqual(["8.8.8.8", 4]);
    const all = await new Promise<unknown>((res) => lookup("rebind.shop.test", { all: true }, (_e, a) => res(a)));
    expect(all).toEqual([{ address: "8.8.8.8", family: 4 }]);
    expect(resolver.calls).toBe(1);
    // A fresh check (the next delivery attempt) sees the loopback answer and refuses it.
    const again = await resolveCallback(`http://rebind.shop.test:${port}/hook`, { resolver });
    expect(again.ok ? "ok" : again.refusal.reason).toBe("loopback");
    expect(got).toHaveLength(0);
  });

  it("over a real connection: the request reaches the checked address even though the name now resolves elsewhere", async () => {
    // Loopback only: the name is allow-listed, its first answer is the receiver's 127.0.0.1, later answers
    // say 127.0.0.2 where nothing listens. The POST must reach 127.0.0.1 with the name as its Host.
    const resolver = fakeResolver({ "pinned.shop.test": [["127.0.0.1"], ["127.0.0.2"]] });
    const r = await resolveCallback(`http://pinned.shop.test:${port}/hook`, { resolver, allowHosts: ["pinned.shop.test"] });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const out = await postToTarget(r.target, { "content-type": "application/json" }, '{"event":"plate.done"}', 2000);
    expect(out).toEqual({ ok: true, status: 204 });
    expect(got).toEqual([{ host: `pinned.shop.test:${port}`, body: '{"event":"plate.done"}' }]);
    expect(resolver.calls).toBe(1);
  });

  it("does not follow a redirect and bounds an attempt by its timeout", async () => {
    const other = http.createServer((req, res) => {
      if (req.url === "/moved") res.writeHead(302, { location: `http://127.0.0.1:${port}/hook` }).end();
      // else: never answer
    });
    await new Promise<void>((r) => other.listen(0, "127.0.0.1", () => r()));
    const p2 = (other.address() as AddressInfo).port;
    try {
      const before = got.length;
      const moved = await resolveCallback(`http://127.0.0.1:${p2}/moved`, { allowHosts: ["127.0.0.1"] });
      if (!moved.ok) throw new Error("expected ok");
      expect(await postToTarget(moved.target, {}, "{}", 2000)).toMatchObject({ ok: false, status: 302 });
      expect(got.length).toBe(before);
      const held = await resolveCallback(`http://127.0.0.1:${p2}/held`, { allowHosts: ["127.0.0.1"] });
      if (!held.ok) throw new Error("expected ok");
      const t0 = Date.now();
      expect(await postToTarget(held.target, {}, "{}", 300)).toMatchObject({ ok: false, error: "no answer within 300 ms" });
      expect(Date.now() - t0).toBeLessThan(2000);
    } finally {
      other.closeAllConnections();
      await new Promise<void>((r) => other.close(() => r()));
    }
  });
});
