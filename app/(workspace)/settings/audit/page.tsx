import type { Metadata } from "next";
import Link from "next/link";
import { listAudit } from "@/lib/accounts/activity";
import { requirePermission } from "@/lib/auth/guards";
import { PLANS, type PlanId } from "@/lib/billing/plans";
import { when } from "@/lib/format";
import { DataTable } from "../../_components/page-header";

export const metadata: Metadata = { title: "Audit log" };

const LABEL: Record<string, string> = {
  sign_in: "signed in",
  sign_in_failed: "failed to sign in",
  sign_up: "created an account",
  sign_up_requested: "asked to create an account",
  sign_up_existing_address: "was tried for a new account (nothing changed)",
  password_changed: "changed the password",
  signed_out_everywhere: "signed out everywhere",
  password_reset_requested: "asked for a password reset",
  password_reset: "reset the password",
  invitation_sent: "invited",
  invitation_resent: "sent the invitation again to",
  invitation_revoked: "withdrew the invitation of",
  invitation_accepted: "accepted an invitation",
  role_changed: "changed the role of",
  member_removed: "removed",
  workspace_created: "created the workspace",
  api_key_created: "created the API key",
  api_key_revoked: "revoked the API key",
  template_created: "created the template",
  template_version_saved: "saved a new version of the template",
  template_version_restored: "restored a version of the template",
  template_duplicated: "duplicated a template as",
  template_archived: "archived the template",
  template_unarchived: "brought back the template",
  template_renamed: "renamed the template",
  checkout_started: "started a checkout",
  plan_changed: "plan changed",
  billing_event: "reported",
};

/** The payment provider's events the app applies, in words. */
const PROVIDER_EVENT: Record<string, string> = {
  "checkout.session.completed": "checkout completed",
  "customer.subscription.created": "subscription started",
  "customer.subscription.updated": "subscription updated",
  "customer.subscription.deleted": "subscription ended",
  "invoice.paid": "payment received",
  "invoice.payment_failed": "payment failed",
};

/** What a change went from and to, in words: plans by their names, roles as they are; a provider event by what it says. */
function changeWords(action: string, details: Record<string, unknown> | null): string {
  if (!details) return "";
  const event = typeof details.event === "string" ? (PROVIDER_EVENT[details.event] ?? "another event") : null;
  if (action === "billing_event") return event ? `: ${event}` : "";
  if (!("to" in details)) return "";
  const plan = action === "plan_changed" || action === "billing_event";
  const name = (v: unknown) => (plan && typeof v === "string" && v in PLANS ? PLANS[v as PlanId].name : String(v));
  const reason = typeof details.reason === "string" ? `: ${details.reason}` : event ? `: ${event}` : "";
  return "from" in details ? ` (${name(details.from)} → ${name(details.to)})${reason}` : ` to ${name(details.to)}${reason}`;
}

/** Who acted: a person, an address that was tried, an API key by its name, or the payment provider. */
function who(r: {
  action: string;
  actorName: string | null;
  actorUserEmail: string | null;
  actorEmail: string | null;
  actorKeyName: string | null;
  actorKeyPrefix: string | null;
  details: Record<string, unknown> | null;
}): string {
  const person = r.actorName ?? r.actorUserEmail ?? r.actorEmail;
  if (person) return person;
  if (r.actorKeyName) return `the API key “${r.actorKeyName}” (swk_${r.actorKeyPrefix}…)`;
  // A plan changed by an event came from the provider; one without (a grace period that ran out) from Slabwright itself.
  if (r.action === "billing_event" || (r.action === "plan_changed" && r.details && "event" in r.details)) return "the payment provider";
  return r.action === "plan_changed" ? "Slabwright" : "—";
}

export default async function AuditPage({ searchParams }: { searchParams: Promise<{ page?: string }> }) {
  const { caller, allowed } = await requirePermission("audit:view");
  if (!allowed) return <p className="card p-4 text-sm">Only the workspace&apos;s owners can read the audit log.</p>;
  const page = Math.max(1, Number.parseInt((await searchParams).page ?? "1", 10) || 1);
  const { rows, pages, total } = await listAudit(caller, page);
  return (
    <div className="space-y-3">
      <p className="text-sm text-muted">{total} events, newest first.</p>
      <DataTable label="Audit log" head={["When", "Who", "What", "From"]}>
        {rows.map((r) => (
          <tr key={r.id}>
            {/* Date and time each stay whole; on a phone the time goes under the date. */}
            <td className="!whitespace-normal px-3 py-2 font-mono text-xs">
              <span className="whitespace-nowrap">{when(r.createdAt).slice(0, 10)}</span>{" "}
              <span className="whitespace-nowrap">{when(r.createdAt).slice(11)}</span>
            </td>
            {/* Words wrap and a long address breaks anywhere: a phone then shows what happened. */}
            <td className="!whitespace-normal px-3 py-2">{who(r)}</td>
            <td className="!whitespace-normal px-3 py-2">
              {LABEL[r.action] ?? r.action.replaceAll("_", " ")}
              {r.target && !r.target.match(/^[0-9a-f-]{36}$/) ? (
                <>
                  {" "}
                  <strong className="[overflow-wrap:anywhere]">{r.target}</strong>
                </>
              ) : null}
              {changeWords(r.action, r.details)}
            </td>
            <td className="px-3 py-2 font-mono text-xs text-muted">{r.ip ?? ""}</td>
          </tr>
        ))}
      </DataTable>
      <nav className="flex items-center gap-3 text-sm" aria-label="Pages">
        {page > 1 ? (
          <Link className="btn-quiet px-3 py-1" href={`?page=${page - 1}`}>
            Newer
          </Link>
        ) : null}
        <span className="text-muted">
          Page {page} of {pages}
        </span>
        {page < pages ? (
          <Link className="btn-quiet px-3 py-1" href={`?page=${page + 1}`}>
            Older
          </Link>
        ) : null}
      </nav>
    </div>
  );
}
