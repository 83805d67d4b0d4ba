import { readFileSync } from "node:fs";

/** The app that npm test started for the HTTP integration tests. */
export function baseUrl(): string {
  const url = process.env.SLAB_TEST_BASE_URL;
  if (!url) throw new Error("SLAB_TEST_BASE_URL is not set: run the integration tests through npm test, which starts the app");
  return url;
}

export function demoUser(role: string): { email: string; password: string } {
  const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
    users: { email: string; password: string; role: string }[];
  };
  return creds.users.find((u) => u.role === role)!;
}

export type HttpSession = { fetch: (path: string, init?: RequestInit) => Promise<Response>; cookie: () => string };

/** Sign in the way a browser does (Auth.js CSRF token, then the credentials callback) and keep the cookies. */
export async function signInOverHttp(email: string, password: string): Promise<HttpSession> {
  const jar = new Map<string, string>();
  const keep = (r: Response) => {
    for (const c of r.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      jar.set(pair!.slice(0, i), pair!.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${baseUrl()}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${baseUrl()}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email, password, callbackUrl: baseUrl() }),
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes("session-token"))) throw new Error(`sign-in as ${email} failed (HTTP ${res.status})`);
  return {
    cookie,
    fetch: (path, init = {}) =>
      fetch(`${baseUrl()}${path}`, { ...init, headers: { ...(init.headers as Record<string, string>), cookie: cookie() } }),
  };
}

export type Received = { headers: import("node:http").IncomingHttpHeaders; body: string };

/** A webhook receiver on loopback that keeps every request it gets; answers `status`. */
export async function startReceiver(
  status = 204,
): Promise<{ url: (path?: string) => string; received: Received[]; close: () => Promise<void> }> {
  const http = await import("node:http");
  const received: Received[] = [];
  const server = http.createServer((req, res) => {
    let body = "";
    req.on("data", (c) => (body += c));
    req.on("end", () => {
      received.push({ headers: req.headers, body });
      res.writeHead(status).end();
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const port = (server.address() as { port: number }).port;
  return {
    url: (path = "/") => `http://127.0.0.1:${port}${path}`,
    received,
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}

export type Held = { path: string; at: number };

/**
 * A webhook receiver on loopback that takes every request and never answers (a slow or hostile
 * callback host). `close()` cuts the held connections.
 */
export async function startHoldingReceiver(): Promise<{ url: (path?: string) => string; held: Held[]; close: () => Promise<void> }> {
  const http = await import("node:http");
  const held: Held[] = [];
  const server = http.createServer((req) => {
    held.push({ path: req.url ?? "", at: Date.now() });
    req.resume();
  });
  server.requestTimeout = 0;
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const port = (server.address() as { port: number }).port;
  return {
    url: (path = "/") => `http://127.0.0.1:${port}${path}`,
    held,
    close: () =>
      new Promise<void>((r) => {
        server.closeAllConnections();
        server.close(() => r());
      }),
  };
}
