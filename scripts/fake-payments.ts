/**
 * A local stand-in for the payment provider, for development and tests only: just the endpoints the
 * app calls through the stripe SDK (customers, checkout sessions, billing portal sessions,
 * subscriptions), a hosted "pay" page for the demo, and signed webhook events sent the way the real
 * service sends them: a `Stripe-Signature: t=<unix time>,v1=<HMAC-SHA256 of "t.body">` header.
 * Test controls under /_control make a payment fail, resend an event, or send one late.
 *
 * Its API key and webhook signing key come from the environment (npm start / npm test make them once
 * per installation under .data/ and give the same ones to the app): none is written here, and the
 * API answers 401 to a request without the key, as the real service does.
 */
import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import http from "node:http";

const port = Number(process.env.SLAB_PAYMENTS_PORT ?? 12111);
const webhookUrl = process.env.SLAB_BILLING_WEBHOOK_URL ?? "http://localhost:3000/api/billing/webhook";
const secret = process.env.STRIPE_WEBHOOK_SECRET ?? "";
const apiKey = process.env.STRIPE_SECRET_KEY ?? "";
if (!secret || !apiKey) {
  console.error("fake payments: STRIPE_WEBHOOK_SECRET and STRIPE_SECRET_KEY must be set (npm start and npm test make them under .data/)");
  process.exit(1);
}
/** The SDK's `Authorization: Bearer <key>`, compared in constant time. */
function authorized(header: string | undefined): boolean {
  const given = Buffer.from(/^Bearer (.+)$/.exec(header ?? "")?.[1] ?? "");
  const want = Buffer.from(apiKey);
  return given.length === want.length && timingSafeEqual(given, want);
}
const PRICES: Record<string, { plan: string; amount: number; name: string }> = {
  [process.env.STRIPE_PRICE_WORKSHOP ?? "price_workshop_monthly"]: { plan: "workshop", amount: 1900, name: "Workshop" },
  [process.env.STRIPE_PRICE_FARM ?? "price_farm_monthly"]: { plan: "farm", amount: 7900, name: "Farm" },
};

type Rec = Record<string, unknown>;
const customers = new Map<string, Rec>();
const sessions = new Map<string, Rec>();
const subscriptions = new Map<string, Rec>();
const events = new Map<string, Rec>();
const id = (p: string) => `${p}_${randomBytes(9).toString("hex")}`;
const now = () => Math.floor(Date.now() / 1000);
const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c]!);

/** Form bodies as the SDK sends them: a[b][0][c]=v → nested objects and arrays. */
function parseForm(body: string): Rec {
  const out: Rec = {};
  for (const [k, v] of new URLSearchParams(body)) {
    const keys = k.replace(/\]/g, "").split("[");
    let node: Rec = out;
    keys.forEach((key, i) => {
      if (i === keys.length - 1) node[key] = v;
      else node = (node[key] ??= /^\d+$/.test(keys[i + 1]!) ? {} : {}) as Rec;
    });
  }
  return out;
}

async function send(type: string, object: Rec, created = now()): Promise<Rec> {
  const event = { id: id("evt"), object: "event", api_version: "2025-01-01", created, type, data: { object }, livemode: false };
  events.set(event.id, event);
  await deliver(event);
  return event;
}

async function deliver(event: Rec): Promise<number> {
  const payload = JSON.stringify(event);
  const t = now();
  const sig = createHmac("sha256", secret).update(`${t}.${payload}`).digest("hex");
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const r = await fetch(webhookUrl, {
        method: "POST",
        headers: { "content-type": "application/json", "stripe-signature": `t=${t},v1=${sig}` },
        body: payload,
      });
      if (r.ok || r.status === 400) return r.status;
    } catch {
      // the app is not up yet: try again
    }
    await new Promise((res) => setTimeout(res, 500 * (attempt + 1)));
  }
  return 0;
}

function subscriptionFor(session: Rec): Rec {
  const price = ((session.line_items as Rec)["0"] as Rec).price as string;
  const start = now();
  const end = start + 30 * 86400;
  const sub = {
    id: id("sub"),
    object: "subscription",
    customer: session.customer,
    status: "active",
    metadata: session.subscription_data ? ((session.subscription_data as Rec).metadata ?? {}) : (session.metadata ?? {}),
    current_period_start: start,
    current_period_end: end,
    items: { object: "list", data: [{ id: id("si"), price: { id: price }, current_period_start: start, current_period_end: end }] },
  };
  subscriptions.set(sub.id, sub);
  return sub;
}

const invoice = (sub: Rec, paid: boolean): Rec => {
  const price = (((sub.items as Rec).data as Rec[])[0]!.price as Rec).id as string;
  const amount = PRICES[price]?.amount ?? 0;
  return {
    id: id("in"),
    object: "invoice",
    customer: sub.customer,
    subscription: sub.id,
    status: paid ? "paid" : "open",
    amount_paid: paid ? amount : 0,
    amount_due: amount,
    currency: "eur",
    lines: { data: [{ period: { start: sub.current_period_start, end: sub.current_period_end } }] },
  };
};

/** The plan a subscription is for, by its first item's price. */
const planName = (sub: Rec) => PRICES[(((sub.items as Rec).data as Rec[])[0]!.price as Rec).id as string]?.name ?? "?";
const cancelForm = `<form method="post"><button name="do" value="cancel" class="quiet">Cancel the plan</button></form>`;

function page(title: string, body: string): string {
  return (
    `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" ` +
    `content="width=device-width"><title>${esc(title)}</title>
<style>body{font:16px system-ui,sans-serif;background:#f3f1ec;color:#1f2328;display:grid;place-items:center;min-height:100vh;margin:0}
main{background:#fff;border:1px solid #ddd5c8;border-radius:10px;padding:28px;max-width:420px;width:100%}
h1{font-size:20px}
button{font:inherit;padding:10px 16px;border-radius:8px;border:1px solid #1f2328;
background:#1f2328;color:#fff;cursor:pointer;margin-right:8px}
button.quiet{background:#fff;color:#1f2328}
label{display:block;font-size:13px;color:#5c6370;margin:12px 0 4px}
input{font:inherit;width:100%;padding:8px;border:1px solid #ccc;border-radius:6px;box-sizing:border-box}
.note{font-size:12px;color:#5c6370;margin-top:16px}</style></head><body><main>${body}</main></body></html>`
  );
}

const server = http.createServer(async (req, res) => {
  const url = new URL(req.url ?? "/", `http://127.0.0.1:${port}`);
  let body = "";
  for await (const c of req) body += c;
  const json = (status: number, v: unknown) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(v));
  };
  const html = (s: string) => {
    res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
    res.end(s);
  };
  const m = (re: RegExp) => re.exec(url.pathname);
  if (url.pathname.startsWith("/v1/") && !authorized(req.headers.authorization)) {
    return json(401, { error: { type: "invalid_request_error", message: "Invalid API Key provided" } });
  }
  try {
    if (req.method === "POST" && url.pathname === "/v1/customers") {
      const f = parseForm(body);
      const c = { id: id("cus"), object: "customer", email: f.email ?? null, metadata: f.metadata ?? {} };
      customers.set(c.id, c);
      return json(200, c);
    }
    if (req.method === "POST" && url.pathname === "/v1/checkout/sessions") {
      const f = parseForm(body);
      const price = ((f.line_items as Rec | undefined)?.["0"] as Rec | undefined)?.price as string | undefined;
      if (!price || !PRICES[price]) return json(400, { error: { type: "invalid_request_error", message: `No such price: ${price}` } });
      const s = {
        id: id("cs"),
        object: "checkout.session",
        mode: f.mode,
        customer: f.customer,
        status: "open",
        payment_status: "unpaid",
        metadata: f.metadata ?? {},
        subscription_data: f.subscription_data,
        line_items: f.line_items,
        success_url: f.success_url,
        cancel_url: f.cancel_url,
        url: "",
      };
      s.url = `http://${req.headers.host}/pay/${s.id}`;
      sessions.set(s.id, s);
      return json(200, s);
    }
    if (req.method === "POST" && url.pathname === "/v1/billing_portal/sessions") {
      const f = parseForm(body);
      return json(200, {
        id: id("bps"),
        object: "billing_portal.session",
        customer: f.customer,
        return_url: f.return_url,
        url: `http://${req.headers.host}/portal/${f.customer}?return=${encodeURIComponent(String(f.return_url))}`,
      });
    }
    let r = m(/^\/v1\/checkout\/sessions\/([\w]+)$/);
    if (req.method === "GET" && r)
      return sessions.has(r[1]!)
        ? json(200, sessions.get(r[1]!))
        : json(404, { error: { type: "invalid_request_error", message: `No such checkout.session: ${r[1]}` } });
    r = m(/^\/v1\/subscriptions\/([\w]+)$/);
    if (req.method === "GET" && r)
      return subscriptions.has(r[1]!)
        ? json(200, subscriptions.get(r[1]!))
        : json(404, { error: { type: "invalid_request_error", message: "No such subscription" } });

    // The hosted pay page.
    r = m(/^\/pay\/([\w]+)$/);
    if (r) {
      const s = sessions.get(r[1]!);
      if (!s) return html(page("Not found", "<h1>This checkout has ended.</h1>"));
      const price = PRICES[((s.line_items as Rec)["0"] as Rec).price as string]!;
      if (req.method === "GET") {
        return html(
          page(
            `Pay · ${price.name}`,
            `<h1>${esc(price.name)} plan</h1><p>€${(price.amount / 100).toFixed(2)} a month</p>
<form method="post"><label for="card">Card number (on this test page any 16 digits do)</label>
<input id="card" name="card" value="1020 3040 5060 7080" inputmode="numeric">
<p><button type="submit" name="do" value="pay">Pay €${(price.amount / 100).toFixed(2)}</button>
<button class="quiet" type="submit" name="do" value="cancel">Cancel</button></p></form>
<p class="note">A local test payment page: no money moves.</p>`,
          ),
        );
      }
      const f = new URLSearchParams(body);
      if (f.get("do") === "cancel") {
        res.writeHead(303, { location: String(s.cancel_url) }).end();
        return;
      }
      const sub = subscriptionFor(s);
      Object.assign(s, { status: "complete", payment_status: "paid", subscription: sub.id });
      await send("checkout.session.completed", { ...s });
      await send("customer.subscription.created", { ...sub });
      await send("invoice.paid", invoice(sub, true));
      res.writeHead(303, { location: String(s.success_url) }).end();
      return;
    }
    // The billing portal: cancel the plan, or switch it.
    r = m(/^\/portal\/([\w]+)$/);
    if (r) {
      const customer = r[1]!;
      const sub = [...subscriptions.values()].find((x) => x.customer === customer && x.status !== "canceled");
      const back = url.searchParams.get("return") ?? "/";
      if (req.method === "GET") {
        return html(
          page(
            "Billing",
            `<h1>Your subscription</h1>` +
              (sub ? `<p>Plan: ${esc(planName(sub))}</p>` + cancelForm : "<p>No active subscription.</p>") +
              `<p><a href="${esc(back)}">Back to Slabwright</a></p>`,
          ),
        );
      }
      if (sub && new URLSearchParams(body).get("do") === "cancel") {
        sub.status = "canceled";
        await send("customer.subscription.deleted", { ...sub });
      }
      res.writeHead(303, { location: back }).end();
      return;
    }
    // Test controls.
    if (req.method === "POST" && url.pathname === "/_control/fail-payment") {
      const f = JSON.parse(body || "{}") as { customer?: string };
      const sub = [...subscriptions.values()].find((x) => x.customer === f.customer && x.status !== "canceled");
      if (!sub) return json(404, { error: "no subscription" });
      sub.status = "past_due";
      const ev = await send("invoice.payment_failed", invoice(sub, false));
      await send("customer.subscription.updated", { ...sub });
      return json(200, { event: ev.id });
    }
    r = m(/^\/_control\/events\/([\w]+)\/resend$/);
    if (req.method === "POST" && r) {
      const ev = events.get(r[1]!);
      if (!ev) return json(404, { error: "no such event" });
      return json(200, { status: await deliver(ev) });
    }
    if (req.method === "POST" && url.pathname === "/_control/send") {
      // A hand-made event, optionally dated in the past (to test ordering).
      const f = JSON.parse(body) as { type: string; object: Rec; created?: number };
      const ev = await send(f.type, f.object, f.created);
      return json(200, { event: ev.id });
    }
    if (req.method === "GET" && url.pathname === "/_control/events") return json(200, { events: [...events.values()] });
    json(404, { error: { type: "invalid_request_error", message: `Unrecognised request URL (${req.method} ${url.pathname})` } });
  } catch (err) {
    json(500, { error: { type: "api_error", message: err instanceof Error ? err.message : String(err) } });
  }
});

server.listen(port, "127.0.0.1", () => console.log(`fake payments listening on 127.0.0.1:${port}`));
const stop = () => server.close(() => process.exit(0));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
