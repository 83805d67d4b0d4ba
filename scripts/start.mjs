// `npm start` (and `npm run dev` with --dev): install what is missing, start PostgreSQL, migrate, seed
// the demo, build when needed, and serve on 127.0.0.1. Ctrl-C stops the app and the database.
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import {
  DATA,
  appEnv,
  databaseName,
  ensureBuild,
  ensureDatabase,
  ensureDependencies,
  fail,
  lockHeld,
  log,
  migrateAndSeed,
  spawnChild,
  startFakePayments,
  startFakeSmtp,
  startWorker,
  startPostgres,
  stopPostgres,
  takeLock,
  waitForHttp,
} from "./setup.mjs";

const dev = process.argv.includes("--dev");
const port = Number(process.env.PORT ?? 3000);
const url = `http://localhost:${port}`;

const lock = takeLock("app");
if (!lock.ok) fail(`Slabwright is already running (pid ${lock.pid}) at ${url}. Stop it with Ctrl-C in its terminal first.`);

function portFree(p) {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once("error", () => resolve(false));
    srv.listen(p, "127.0.0.1", () => srv.close(() => resolve(true)));
  });
}

if (!(await portFree(port))) {
  lock.release();
  fail(`port ${port} on 127.0.0.1 is already in use; set PORT to another port.`);
}

ensureDependencies();
const startedPg = startPostgres();
let child;
let smtp = null;
let payments = null;
let worker = null;
let stopping = false;

function shutdown(code) {
  if (stopping) return;
  stopping = true;
  log("stopping");
  // Stop the app, the mail and payment fakes and the worker, wait for them (at most 8 s), then the database.
  const children = [child, smtp, payments, worker].filter((c) => c && c.exitCode === null && c.signalCode === null);
  let left = children.length;
  const finish = () => {
    // npm start owns the database: stop it (also one left running by an earlier crash) unless a
    // test run is using it right now.
    if (startedPg || !lockHeld("test")) stopPostgres();
    lock.release();
    process.exit(code);
  };
  if (left === 0) return finish();
  const timer = setTimeout(() => {
    for (const c of children) c.kill("SIGKILL");
    finish();
  }, 8000);
  for (const c of children) {
    c.once("exit", () => {
      if (--left === 0) {
        clearTimeout(timer);
        finish();
      }
    });
    c.kill("SIGTERM");
  }
}
process.on("SIGINT", () => shutdown(0));
process.on("SIGTERM", () => shutdown(0));

try {
  const dbName = databaseName();
  ensureDatabase(dbName);
  const env = appEnv({ port, dbName });
  migrateAndSeed(env);
  if (!dev) ensureBuild();
  smtp = startFakeSmtp(env);
  payments = startFakePayments(env);
  worker = startWorker(env);

  child = spawnChild(process.execPath, ["scripts/serve.mjs", ...(dev ? ["--dev"] : []), "-H", "127.0.0.1", "-p", String(port)], env);
  child.on("exit", (code) => {
    if (!stopping) {
      log(`the app exited (${code})`);
      shutdown(code ?? 1);
    }
  });

  if (!(await waitForHttp(`${url}/api/health`, 120_000))) {
    log("the app did not answer within 2 minutes");
    shutdown(1);
  } else {
    const creds = JSON.parse(fs.readFileSync(path.join(DATA, "demo-credentials.json"), "utf8"));
    const lines = [
      "",
      `Slabwright is running at ${url}`,
      "",
      "Demo sign-ins (Marrowby Tabletop Co.):",
      ...creds.users.map((u) => `  ${u.role.padEnd(9)} ${u.email.padEnd(26)} ${u.password}`),
      `Demo API key (every scope): ${creds.apiKey}`,
      env.SLAB_FAKE_SMTP === "1"
        ? `Mail is caught by a local fake server: each person reads their own at ${url}/settings/outbox; all of it with: npm run outbox`
        : "",
      "",
      "Ctrl-C stops the app and the database.",
      "",
    ];
    process.stdout.write(lines.join("\n"));
  }
} catch (err) {
  console.error(err);
  shutdown(1);
}
