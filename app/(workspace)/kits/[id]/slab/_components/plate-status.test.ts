import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { afterEach, describe, expect, it } from "vitest";
import { pause, watchPlate, type JobStatus } from "./plate-status";

/**
 * A real HTTP server on a loopback port and Node's own fetch and AbortController: aborting a fetch's
 * signal rejects the fetch with an "AbortError" (WHATWG Fetch Standard, "abort the fetch() call"),
 * so what is checked here is what a browser does when the editor is left.
 */
let server: Server | undefined;
afterEach(async () => {
  server?.closeAllConnections();
  await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
  server = undefined;
});

async function serve(answer: (n: number) => { status: number; body: unknown } | "hang") {
  const seen: string[] = [];
  server = createServer((req, res) => {
    seen.push(req.url ?? "");
    const a = answer(seen.length);
    if (a === "hang") return; // never answers: only an abort ends the request
    res.writeHead(a.status, { "content-type": "application/json" });
    res.end(JSON.stringify(a.body));
  });
  await new Promise<void>((resolve) => server!.listen(0, "127.0.0.1", resolve));
  const base = `http://127.0.0.1:${(server!.address() as AddressInfo).port}`;
  return { seen, fetch: (url: string, init: { signal: AbortSignal }) => fetch(new URL(url, base), init) };
}

const job = (status: JobStatus["status"], progress: number, error: string | null = null) => ({
  job: { status, progress, error: error ? { message: error } : null },
});

describe("following a plate", () => {
  it("asks until the plate is done, passing on every answer", async () => {
    const s = await serve((n) => ({ status: 200, body: n === 1 ? job("queued", 0) : n === 2 ? job("running", 0.5) : job("done", 1) }));
    const statuses: string[] = [];
    const end = await watchPlate("p1", {
      signal: new AbortController().signal,
      onStatus: (j) => statuses.push(`${j.status} ${j.progress}`),
      intervalMs: 1,
      fetch: s.fetch,
    });
    expect(end.kind).toBe("done");
    expect(statuses).toEqual(["queued 0", "running 0.5", "done 1"]);
    expect(s.seen).toEqual(["/api/plates/p1/status", "/api/plates/p1/status", "/api/plates/p1/status"]);
  });

  it("stops at a failed build with its message", async () => {
    const s = await serve(() => ({ status: 200, body: job("failed", 0.3, "pieces overlap") }));
    const end = await watchPlate("p2", { signal: new AbortController().signal, onStatus: () => {}, intervalMs: 1, fetch: s.fetch });
    expect(end).toEqual({ kind: "failed", job: { status: "failed", progress: 0.3, error: { message: "pieces overlap" } } });
    expect(s.seen).toHaveLength(1);
  });

  it("stops when the status is lost (an HTTP error, or no answer at all)", async () => {
    const s = await serve(() => ({ status: 404, body: { error: { code: "not_found" } } }));
    expect(await watchPlate("p3", { signal: new AbortController().signal, onStatus: () => {}, intervalMs: 1, fetch: s.fetch })).toEqual({
      kind: "lost",
      reason: "status check answered HTTP 404",
    });
    expect(s.seen).toHaveLength(1);
    // A port nobody listens on: the fetch itself fails.
    const closed = (url: string, init: { signal: AbortSignal }) => fetch(new URL(url, "http://127.0.0.1:9"), init);
    expect(await watchPlate("p3", { signal: new AbortController().signal, onStatus: () => {}, fetch: closed })).toEqual({
      kind: "lost",
      reason: "the status check did not answer",
    });
  });

  it("an answer without a job is lost, not followed for ever", async () => {
    const s = await serve(() => ({ status: 200, body: { findings: [] } }));
    expect((await watchPlate("p4", { signal: new AbortController().signal, onStatus: () => {}, intervalMs: 1, fetch: s.fetch })).kind).toBe(
      "lost",
    );
  });

  it("leaving stops it between two questions: no request after the abort", async () => {
    const s = await serve(() => ({ status: 200, body: job("running", 0.2) }));
    const ctl = new AbortController();
    const answers: number[] = [];
    const watching = watchPlate("p5", { signal: ctl.signal, onStatus: (j) => answers.push(j.progress), intervalMs: 20, fetch: s.fetch });
    while (s.seen.length < 2) await new Promise((r) => setTimeout(r, 5));
    ctl.abort();
    expect(await watching).toEqual({ kind: "stopped" });
    const asked = s.seen.length;
    await new Promise((r) => setTimeout(r, 100)); // five intervals
    expect(s.seen.length).toBe(asked);
  });

  it("leaving cancels the request in flight and reports nothing more", async () => {
    const s = await serve(() => "hang");
    const ctl = new AbortController();
    const answers: JobStatus[] = [];
    const watching = watchPlate("p6", { signal: ctl.signal, onStatus: (j) => answers.push(j), intervalMs: 1, fetch: s.fetch });
    while (s.seen.length < 1) await new Promise((r) => setTimeout(r, 5));
    ctl.abort();
    expect(await watching).toEqual({ kind: "stopped" });
    expect(answers).toEqual([]);
    expect(s.seen).toHaveLength(1);
  });

  it("the pause ends early when the signal aborts", async () => {
    const ctl = new AbortController();
    const t0 = performance.now();
    const p = pause(10_000, ctl.signal);
    setTimeout(() => ctl.abort(), 10);
    await p;
    expect(performance.now() - t0).toBeLessThan(1000);
  });
});
