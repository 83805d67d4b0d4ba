import http from "node:http";
import { env as appEnv } from "@/lib/env";
import https from "node:https";
import { lookup as dnsLookup } from "node:dns/promises";
import type { LookupAddress } from "node:dns";
import { isIP } from "node:net";
import ipaddr from "ipaddr.js";

/**
 * Where a callback may go. Only global unicast addresses are called: the address classes come from
 * ipaddr.js (IANA's special-purpose registries, RFC 6890), and every IPv6 form that carries an IPv4
 * address (IPv4-mapped, IPv4-compatible, IPv4-translated, NAT64 64:ff9b::/96, 6to4, Teredo) is judged
 * by the IPv4 address inside it. A name is resolved once, every address it resolves to must pass, and
 * the delivery then connects to the address that was checked (pinned in the request's `lookup`), so a
 * DNS answer that changes between the check and the connection cannot move the call.
 */

export type AddressVerdict = { ok: true } | { ok: false; reason: string; message: string };

const REASONS: Record<string, string> = {
  unspecified: "an unspecified address",
  broadcast: "the broadcast address",
  multicast: "a multicast address",
  linkLocal: "a link-local address",
  loopback: "a loopback address",
  carrierGradeNat: "a carrier-grade NAT address (100.64.0.0/10)",
  private: "a private address",
  reserved: "a reserved, documentation or benchmarking address",
  as112: "an AS112 sink address",
  amt: "an AMT relay address",
  uniqueLocal: "a unique-local address (fc00::/7)",
  deprecatedSiteLocal: "a site-local address (fec0::/10)",
  discard: "a discard-only address (100::/64)",
  benchmarking: "a benchmarking address",
  as112v6: "an AS112 sink address",
  deprecatedOrchid: "an ORCHID address",
  orchid2: "an ORCHID address",
  droneRemoteIdProtocolEntityTags: "a drone remote ID address",
  segmentRouting: "a segment-routing address",
  notGlobal: "an address outside the global unicast space (2000::/3)",
  localNat64: "a local-use NAT64 address (64:ff9b:1::/48)",
  ipv4Compatible: "a deprecated IPv4-compatible IPv6 address (::/96)",
};

const refuse = (reason: string, address: string, via?: string): AddressVerdict => ({
  ok: false,
  reason,
  message: `${address} is ${REASONS[reason] ?? `not a global address (${reason})`}${via ? `, ${via}` : ""}, which callbacks may not call`,
});

function judgeV4(a: ipaddr.IPv4, shown: string, via?: string): AddressVerdict {
  const range: string = a.range();
  return range === "unicast" ? { ok: true } : refuse(range, shown, via);
}

const v4From = (hi: number, lo: number) => new ipaddr.IPv4([hi >> 8, hi & 0xff, lo >> 8, lo & 0xff]);

function judgeV6(a: ipaddr.IPv6, shown: string): AddressVerdict {
  const p = a.parts;
  const part = (i: number) => p[i] ?? 0;
  const embedded = (hi: number, lo: number, form: string) => {
    const v4 = v4From(hi, lo);
    return judgeV4(v4, shown, `(${form} of ${v4.toString()})`);
  };
  const range: string = a.range();
  switch (range) {
    case "ipv4Mapped": // ::ffff:a.b.c.d (RFC 4291 2.5.5.2)
      return embedded(part(6), part(7), "IPv4-mapped form");
    case "rfc6145": // ::ffff:0:a.b.c.d (RFC 6145)
      return embedded(part(6), part(7), "IPv4-translated form");
    case "rfc6052": // 64:ff9b::a.b.c.d is the well-known NAT64 prefix; 64:ff9b:1::/48 is for local use only
      return part(2) === 0 && part(3) === 0 && part(4) === 0 && part(5) === 0
        ? embedded(part(6), part(7), "NAT64 form")
        : refuse("localNat64", shown);
    case "6to4": // 2002:AABB:CCDD::/48 (RFC 3056)
      return embedded(part(1), part(2), "6to4 form");
    case "teredo": {
      // 2001:0:SSSS:SSSS:flags:port:CCCC:CCCC — server in clear, client obfuscated (RFC 4380 section 4)
      const server = embedded(part(2), part(3), "Teredo server");
      return server.ok ? embedded(~part(6) & 0xffff, ~part(7) & 0xffff, "Teredo client") : server;
    }
    case "unicast": {
      if (p.slice(0, 6).every((x) => x === 0)) {
        // ::a.b.c.d, deprecated (RFC 4291 2.5.5.1): a non-global inner address says so; a global one is still refused.
        const inner = embedded(part(6), part(7), "IPv4-compatible form");
        return inner.ok ? refuse("ipv4Compatible", shown) : inner;
      }
      // Global unicast is 2000::/3 (IANA IPv6 address space); the rest is reserved or special.
      return (part(0) & 0xe000) === 0x2000 ? { ok: true } : refuse("notGlobal", shown);
    }
    default:
      return refuse(range, shown);
  }
}

/** The verdict on one address as written (IPv4 dotted quad or any IPv6 text form, without brackets). */
export function addressVerdict(address: string): AddressVerdict {
  if (!isIP(address)) return { ok: false, reason: "notAnAddress", message: `${address} is not an IP address` };
  const a = ipaddr.parse(address);
  return a.kind() === "ipv4" ? judgeV4(a as ipaddr.IPv4, address) : judgeV6(a as ipaddr.IPv6, address);
}

let warnedProduction = false;

/**
 * The explicit exceptions to the address rule. They exist for test receivers on loopback, so with
 * NODE_ENV=production the list is ignored unless SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION=1 says it is
 * meant (e.g. a receiver on the same private network as a self-hosted install).
 */
export function allowedHosts(
  env: { SLAB_WEBHOOK_ALLOW_HOSTS?: string; SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION?: string; NODE_ENV?: string } = appEnv(),
): string[] {
  const list = (env.SLAB_WEBHOOK_ALLOW_HOSTS ?? "")
    .split(",")
    .map((h) =>
      h
        .trim()
        .toLowerCase()
        .replace(/^\[|\]$/g, ""),
    )
    .filter(Boolean);
  if (list.length && env.NODE_ENV === "production" && env.SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION !== "1") {
    if (!warnedProduction)
      console.warn("[webhook] SLAB_WEBHOOK_ALLOW_HOSTS is ignored in production; set SLAB_WEBHOOK_ALLOW_HOSTS_IN_PRODUCTION=1 to keep it");
    warnedProduction = true;
    return [];
  }
  return list;
}

export type Resolver = (host: string) => Promise<{ address: string; family: number }[]>;
/** The system's resolver (getaddrinfo, as a connection would use), every address it answers. */
export const systemResolver: Resolver = (host) => dnsLookup(host, { all: true, verbatim: true });

export type CallbackTarget = {
  url: URL;
  /** The host name as written (without IPv6 brackets): the Host header and TLS SNI. */
  host: string;
  /** The address that was checked; the connection goes there and nowhere else. */
  address: string;
  family: 4 | 6;
  /** The host is on the explicit allow-list (tests' loopback receivers), so its address was not judged. */
  listed: boolean;
};

export type CallbackRefusal = { code: "invalid_callback"; reason: string; message: string; address?: string };
export type TargetResult = { ok: true; target: CallbackTarget } | { ok: false; refusal: CallbackRefusal };

const refused = (reason: string, message: string, address?: string): TargetResult => ({
  ok: false,
  refusal: { code: "invalid_callback", reason, message: `callbackUrl: ${message}`, ...(address ? { address } : {}) },
});

/**
 * Check a callback URL and settle the one address it will be called at. WHATWG URL parsing has
 * already turned decimal, hex, octal and short IPv4 spellings (2130706433, 0x7f.1, 127.1) into the
 * dotted quad, and IPv6 into its compressed form, so the address judged is the address connected to.
 */
export async function resolveCallback(
  raw: string,
  opts: { resolver?: Resolver; allowHosts?: readonly string[] } = {},
): Promise<TargetResult> {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    return refused("notAUrl", "not a URL");
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") return refused("scheme", "must be http or https");
  const host = url.hostname.replace(/^\[|\]$/g, "").toLowerCase();
  if (!host) return refused("noHost", "has no host");
  const listed = (opts.allowHosts ?? []).includes(host);
  let answers: { address: string; family: number }[];
  if (isIP(host)) answers = [{ address: host, family: isIP(host) }];
  else answers = await (opts.resolver ?? systemResolver)(host).catch(() => []);
  const first = answers[0];
  if (!first) return refused("unresolved", "the host does not resolve");
  if (!listed) {
    for (const a of answers) {
      const v = addressVerdict(a.address);
      if (!v.ok) return refused(v.reason, isIP(host) ? v.message : `${host} resolves to ${v.message}`, a.address);
    }
  }
  return { ok: true, target: { url, host, address: first.address, family: first.family === 6 ? 6 : 4, listed } };
}

type LookupCallback = (err: NodeJS.ErrnoException | null, address: string | LookupAddress[], family?: number) => void;

/** A `lookup` for net/http that answers the checked address for any name, in both of Node's call forms. */
export function pinnedLookup(target: Pick<CallbackTarget, "address" | "family">) {
  return (_hostname: string, options: unknown, callback?: LookupCallback): void => {
    const cb = (typeof options === "function" ? options : callback) as LookupCallback;
    const all = typeof options === "object" && options !== null && (options as { all?: boolean }).all === true;
    if (all) cb(null, [{ address: target.address, family: target.family }]);
    else cb(null, target.address, target.family);
  };
}

export type PostOutcome = { ok: true; status: number } | { ok: false; status?: number; error: string };

/**
 * One POST to the checked address: Host and TLS SNI/certificate name stay the URL's host, redirects
 * are not followed (a 3xx is a failure), the body of the answer is not read, and the whole attempt
 * is bounded by `timeoutMs`.
 */
export function postToTarget(
  target: CallbackTarget,
  headers: Record<string, string>,
  body: string,
  timeoutMs: number,
): Promise<PostOutcome> {
  const lib = target.url.protocol === "https:" ? https : http;
  return new Promise((resolve) => {
    let settled = false;
    const done = (o: PostOutcome) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      resolve(o);
    };
    const req = lib.request(
      {
        method: "POST",
        host: target.host,
        port: target.url.port || undefined,
        path: `${target.url.pathname}${target.url.search}`,
        headers: { ...headers, "content-length": String(Buffer.byteLength(body)) },
        lookup: pinnedLookup(target) as unknown as typeof import("node:dns").lookup,
        agent: false,
        ...(target.url.protocol === "https:" && !isIP(target.host) ? { servername: target.host } : {}),
      },
      (res) => {
        const status = res.statusCode ?? 0;
        res.resume();
        res.on("error", () => undefined);
        done(status >= 200 && status < 300 ? { ok: true, status } : { ok: false, status, error: `HTTP ${status}` });
        req.destroy();
      },
    );
    const timer = setTimeout(() => {
      done({ ok: false, error: `no answer within ${timeoutMs} ms` });
      req.destroy();
    }, timeoutMs);
    req.on("error", (err) => done({ ok: false, error: err.message }));
    req.end(body);
  });
}
