import type { Metadata } from "next";
import { listOutbox } from "@/lib/accounts/activity";
import { requireCaller } from "@/lib/auth/guards";
import { env } from "@/lib/env";
import { when } from "@/lib/format";

export const metadata: Metadata = { title: "Outbox" };
export const dynamic = "force-dynamic";

/** The demo's caught mail, so a person trying Slabwright can click sign-in and invitation links. */
export default async function OutboxPage() {
  const caller = await requireCaller();
  if (env().SLAB_FAKE_SMTP !== "1") return <p className="card p-4 text-sm">The outbox exists only in the demo.</p>;
  const mail = await listOutbox(caller);
  return (
    <div className="space-y-3">
      <p className="text-sm text-muted">
        Mail caught by the local fake mail server (this demo sends nothing out): what was sent to you
        {caller.role === "owner" ? ", and what this workspace sent (its invitations and notes to its plates' makers)" : ""}. Newest first.
        Whoever runs the demo reads all of it with <code className="font-mono">npm run outbox</code>.
      </p>
      {mail.length === 0 ? <p className="card p-4 text-sm text-muted">No mail for you yet.</p> : null}
      {mail.map((m) => (
        <article key={m.id} className="card p-4 text-sm" data-testid="outbox-message">
          <header className="flex flex-wrap justify-between gap-2">
            <strong>{m.subject}</strong>
            <span className="font-mono text-xs text-muted">{when(m.receivedAt)}</span>
          </header>
          <p className="text-xs text-muted">to {m.toAddresses}</p>
          <pre className="mt-2 whitespace-pre-wrap break-words font-sans">{linkify(m.text ?? "")}</pre>
        </article>
      ))}
    </div>
  );
}

function linkify(text: string) {
  return text.split(/(https?:\/\/\S+)/g).map((part, i) =>
    /^https?:\/\//.test(part) ? (
      <a key={i} href={part} className="break-all text-accent underline">
        {part}
      </a>
    ) : (
      part
    ),
  );
}
