import type { Metadata } from "next";
import Link from "next/link";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { appUrl } from "@/lib/mail";
import { webhookSecret } from "@/lib/jobs/webhook";
import { PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "API" };

function Code({ children }: { children: string }) {
  // Long lines wrap inside the box (a phone is narrower than any command), indentation kept.
  return <pre className="card whitespace-pre-wrap p-3 font-mono text-xs leading-5 [overflow-wrap:anywhere]">{children}</pre>;
}

export default async function DevelopersPage() {
  const caller = await requireCaller();
  const owner = can(caller.role, "api-keys:manage");
  const base = appUrl("/").replace(/\/$/, "");
  const secret = owner ? await webhookSecret(caller) : null;
  const curl = `# --fail-with-body: on a refusal curl exits non-zero, and the file holds the JSON error instead of a plate
curl -sS --fail-with-body -X POST ${base}/api/v1/plates \\
  -H "Authorization: Bearer $SLAB_KEY" \\
  -H "Idempotency-Key: order-10482" \\
  -F part=@tile.stl -F part=@pawn.stl \\
  -F 'quantity=[4, 2]' \\
  -F 'options={"marks":{"text":[{"value":"ORDER {order}"}],"qr":{"value":"https://shop.example/o/{order}"}}}' \\
  -F 'variables={"order":"10482"}' \\
  -F format=3mf -o plate-10482.3mf -D -`;
  const curlTemplate = `# A saved template (GET /api/v1/templates lists them, with their variables)
curl -sS --fail-with-body -X POST ${base}/api/v1/plates \\
  -H "Authorization: Bearer $SLAB_KEY" \\
  -F kit=$KIT_ID -F template=$TEMPLATE_ID \\
  -F 'variables={"order":"10482","customer":"Sam"}' \\
  -F format=stl -o plate-10482.stl`;
  const fetchJs = `const form = new FormData();
form.append("kit", kitId);                       // or append("part", file, "tile.stl") per mesh
form.append("variables", JSON.stringify({ order: "10482", customer: "Sam" }));
form.append("format", "json");
const res = await fetch("${base}/api/v1/plates", {
  method: "POST",
  headers: { Authorization: \`Bearer \${key}\`, "Idempotency-Key": "order-10482" },
  body: form,
});
if (res.status === 202) {                         // still building: poll the job
  const { job } = await res.json();
  // GET ${base}\${job.statusUrl} until job.status is "done", then fetch job.result.stl or job.result["3mf"]
}`;
  const verify = `// Webhook: POST { event: "plate.done" | "plate.failed", plate, job, at }
// Header Slabwright-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of "<t>.<raw body>">
import { createHmac, timingSafeEqual } from "node:crypto";
function verify(raw, header, secret) {
  const [, t, v1] = /^t=(\\d+),v1=([0-9a-f]{64})$/.exec(header) ?? [];
  if (!t || Math.abs(Date.now() / 1000 - Number(t)) > 300) return false;
  const want = createHmac("sha256", secret).update(\`\${t}.\${raw}\`).digest();
  return timingSafeEqual(want, Buffer.from(v1, "hex"));
}`;
  return (
    <>
      <PageHeader
        title="API"
        lead="Order systems make plates with the same engine: post meshes or name a kit, get a print-ready file back."
      />
      <div className="space-y-6 text-sm">
        <p>
          Keys are made by owners under{" "}
          <Link className="text-accent underline" href="/settings/api-keys">
            Settings → API keys
          </Link>
          . The full reference, generated from the same schemas the server checks, is at{" "}
          <a className="font-mono text-accent underline" href="/api/v1/openapi.json">
            /api/v1/openapi.json
          </a>{" "}
          (OpenAPI 3.1).
        </p>
        <section className="space-y-2">
          <h2 className="text-lg">Make a plate with curl</h2>
          <Code>{curl}</Code>
          <p className="text-sm text-muted">
            With a template: its options apply (options you send override them), and variables fill its placeholders. A variable the
            template does not have, or one without a value or a default, is a 422 that names it; add{" "}
            <code className="font-mono">templateVersion</code> to use an earlier version.
          </p>
          <Code>{curlTemplate}</Code>
          <p className="text-muted">
            A build that takes longer than 20 s answers 202 with a job to poll; send{" "}
            <code className="font-mono">Prefer: respond-async</code> to get the 202 at once. Errors are JSON:{" "}
            <code className="font-mono">{'{ "error": { "code", "message", "details" } }'}</code>.
          </p>
        </section>
        <section className="space-y-2">
          <h2 className="text-lg">With fetch</h2>
          <Code>{fetchJs}</Code>
        </section>
        <section className="space-y-2">
          <h2 className="text-lg">Webhooks</h2>
          <p className="text-muted">
            Send <code className="font-mono">callbackUrl</code> with the request; when the build ends we post a signed event, retrying five
            times with growing pauses (about five minutes in all). It must be a public address: private, loopback, link-local and other
            special addresses are refused.
          </p>
          <Code>{verify}</Code>
          {secret ? (
            <p>
              This workspace&apos;s signing secret:{" "}
              <code className="break-all font-mono" data-testid="webhook-secret">
                {secret}
              </code>
            </p>
          ) : (
            <p className="text-muted">Owners see the workspace&apos;s signing secret here.</p>
          )}
        </section>
      </div>
    </>
  );
}
