// Serves the Next.js app (production build, or dev with --dev) from our own HTTP server, so the app
// learns the client's address from the socket (scripts/client-address.mjs) and not from a header any
// client can forge.   node scripts/serve.mjs [--dev] -H 127.0.0.1 -p 3000
import http from "node:http";
import busboy from "busboy";
import next from "next";
import { CLIENT_HEADER, clientAddress, parseTrustedProxies } from "./client-address.mjs";

const args = process.argv.slice(2);
const opt = (flag, fallback) => {
  const i = args.indexOf(flag);
  return i >= 0 && args[i + 1] ? args[i + 1] : fallback;
};
const dev = args.includes("--dev");
const hostname = opt("-H", "127.0.0.1");
const port = Number(opt("-p", process.env.PORT ?? 3000));
const ranges = parseTrustedProxies(process.env.SLAB_TRUSTED_PROXIES);

const app = next({ dev, hostname, port });
const handle = app.getRequestHandler();
await app.prepare();
const upgrade = typeof app.getUpgradeHandler === "function" ? app.getUpgradeHandler() : null;

/** Next's own limit for a server action's body (serverActions.bodySizeLimit, 1 MB by default). */
const ACTION_BODY_LIMIT = 1024 * 1024;

function refuse(res, status, code, message) {
  res.writeHead(status, { "content-type": "application/json; charset=utf-8" });
  res.end(JSON.stringify({ error: { code, message } }));
}

/** Whether a multipart body is well formed (busboy reads it to the end without an error). */
function multipartOk(headers, body) {
  return new Promise((resolve) => {
    let bb;
    try {
      bb = busboy({ headers, limits: { fieldSize: ACTION_BODY_LIMIT } });
    } catch {
      return resolve(false);
    }
    bb.on("file", (_name, stream) => stream.resume());
    bb.on("error", () => resolve(false));
    bb.on("close", () => resolve(true));
    bb.end(body);
  });
}

/**
 * React's encoding of action arguments marks special values with a leading "$"; in a plain-text
 * body (no other parts to point at) only self-contained ones can occur. Anything else — a reference
 * to a part that is not there — makes Next's decoder fail with a 500, so it is refused here, as is a
 * NUL character, which no name or field of ours may hold.
 */
const SELF_CONTAINED = /^\$(\$|undefined$|NaN$|Infinity$|-Infinity$|-0$|D|n)/;
function badValue(v, depth = 0) {
  if (depth > 64) return "The form's data is nested too deeply.";
  if (typeof v === "string") {
    if (v.includes("\u0000")) return "The form holds a NUL character, which no field can contain.";
    if (v.startsWith("$") && !SELF_CONTAINED.test(v)) return "The form's data refers to parts that were not sent.";
    return null;
  }
  if (Array.isArray(v)) {
    for (const x of v) {
      const p = badValue(x, depth + 1);
      if (p) return p;
    }
    return null;
  }
  if (v && typeof v === "object") {
    for (const [k, x] of Object.entries(v)) {
      const p = badValue(k, depth + 1) ?? badValue(x, depth + 1);
      if (p) return p;
    }
  }
  return null;
}

/**
 * Server actions: Next answers a body it cannot decode with a bare 500. Read the (small) body here
 * first; refuse one that is too large (413) or malformed (400) with our JSON error, and hand Next a
 * copy of the request carrying the same bytes.
 */
async function checkedAction(req, res) {
  const chunks = [];
  let size = 0;
  for await (const chunk of req) {
    size += chunk.length;
    if (size > ACTION_BODY_LIMIT) {
      refuse(res, 413, "body_too_large", "The form sent more than 1 MB.");
      req.destroy();
      return null;
    }
    chunks.push(chunk);
  }
  const body = Buffer.concat(chunks);
  const type = String(req.headers["content-type"] ?? "").toLowerCase();
  if (type.startsWith("multipart/form-data")) {
    if (!(await multipartOk(req.headers, body))) return (refuse(res, 400, "bad_form", "The form's data could not be read."), null);
  } else if (type.startsWith("text/plain")) {
    let args;
    try {
      args = JSON.parse(body.toString("utf8"));
    } catch {
      return (refuse(res, 400, "bad_form", "The form's data is not valid JSON."), null);
    }
    if (!Array.isArray(args)) return (refuse(res, 400, "bad_form", "The form's data must be a list of arguments."), null);
    const problem = badValue(args);
    if (problem) return (refuse(res, 400, "bad_form", problem), null);
  } else if (!type.startsWith("application/x-www-form-urlencoded")) {
    return (refuse(res, 415, "unsupported_media_type", "A form is sent as multipart/form-data or text/plain."), null);
  }
  const copy = new http.IncomingMessage(req.socket);
  Object.assign(copy, {
    method: req.method,
    url: req.url,
    headers: req.headers,
    rawHeaders: req.rawHeaders,
    httpVersion: req.httpVersion,
    httpVersionMajor: req.httpVersionMajor,
    httpVersionMinor: req.httpVersionMinor,
    complete: true,
  });
  copy.push(body);
  copy.push(null);
  return copy;
}

const server = http.createServer(async (req, res) => {
  req.headers[CLIENT_HEADER] = clientAddress(req.socket.remoteAddress, req.headers["x-forwarded-for"], ranges);
  // Without a trusted proxy in front, what the client says about forwarding is not passed on.
  if (ranges.length === 0) delete req.headers["x-forwarded-for"];
  if (req.method === "POST" && req.headers["next-action"]) {
    try {
      const copy = await checkedAction(req, res);
      if (copy) handle(copy, res);
    } catch {
      if (!res.headersSent) refuse(res, 400, "bad_request", "The request could not be read.");
    }
    return;
  }
  handle(req, res);
});
// Keep idle connections longer than clients do (undici: 4 s by default), so a client never writes
// into a socket the server has just closed (EPIPE).
server.keepAliveTimeout = 65_000;
server.headersTimeout = 66_000;
if (upgrade) server.on("upgrade", (req, socket, head) => upgrade(req, socket, head));
server.listen(port, hostname, () => console.log(`Slabwright listening on http://${hostname}:${port}${dev ? " (dev)" : ""}`));
const stop = () => {
  server.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 3000).unref();
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
