// Serves the Next.js app (production build, or dev with --dev) from our own HTTP server, so the app
// learns the client's address from the socket (scripts/client-address.mjs) and not from a header any
// client can forge.   node scripts/serve.mjs [--dev] -H 127.0.0.1 -p 3000
import http from "node:http";
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

const server = http.createServer((req, res) => {
  req.headers[CLIENT_HEADER] = clientAddress(req.socket.remoteAddress, req.headers["x-forwarded-for"], ranges);
  // Without a trusted proxy in front, what the client says about forwarding is not passed on.
  if (ranges.length === 0) delete req.headers["x-forwarded-for"];
  handle(req, res);
});
if (upgrade) server.on("upgrade", (req, socket, head) => upgrade(req, socket, head));
server.listen(port, hostname, () => console.log(`Slabwright listening on http://${hostname}:${port}${dev ? " (dev)" : ""}`));
const stop = () => {
  server.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 3000).unref();
};
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
