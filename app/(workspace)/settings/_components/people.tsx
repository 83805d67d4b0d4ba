"use client";

import { useState, useTransition } from "react";
import { useWatch } from "react-hook-form";
import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import type { Role } from "@/db/schema/workspaces";
import { ROLE_LABEL, ROLES } from "@/lib/auth/permissions";
import { day } from "@/lib/format";
import { inviteSchema, type ActionResult } from "@/lib/validation/accounts";
import { dropMember, sendInvitation, sendInvitationAgain, setMemberRole, withdrawInvitation } from "../actions";

type Member = { userId: string; name: string | null; email: string; role: Role; since: string };
type Pending = { id: string; email: string; role: Role; sentAt: string; expiresAt: string };

export function People({ members, pending, manage, me }: { members: Member[]; pending: Pending[]; manage: boolean; me: string }) {
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, start] = useTransition();
  // Bumped after every change so the role pickers show what the server holds (also after a refusal).
  const [version, setVersion] = useState(0);
  const run = (p: Promise<{ ok: boolean; message?: string }>) =>
    start(async () => {
      const r = await p;
      setMessage({ ok: r.ok, text: r.message ?? (r.ok ? "Done." : "That did not work.") });
      setVersion((v) => v + 1);
    });
  // What "Send again" answered, shown where it was pressed: at the invitation form or above the waiting list.
  const [note, setNote] = useState<{ at: "form" | "list"; ok: boolean; text: string } | null>(null);
  // The address an invitation is already waiting for, when the form was refused for it: "Send again" is offered there.
  const [waiting, setWaiting] = useState<string | null>(null);
  const send = async (v: { email: string; role: Role }): Promise<ActionResult> => {
    const r = await sendInvitation(v);
    const pendingAlready = !r.ok && r.code === "invitation_pending";
    setWaiting(pendingAlready ? v.email.trim().toLowerCase() : null);
    setNote(null);
    // The field says why; above the button it is enough to say that no second mail went out.
    return pendingAlready ? { ...r, message: "Nothing was sent." } : r;
  };
  const invite = useServerForm(inviteSchema, send, { email: "", role: "designer" }, (_r, form) =>
    form.reset({ email: "", role: form.getValues("role") }),
  );
  const typed = useWatch({ control: invite.form.control, name: "email" });
  // The form's own answer that a "Send again" at the field has since overtaken (not shown again).
  const [overtaken, setOvertaken] = useState<object | null>(null);
  const again = (email: string, at: "form" | "list") =>
    start(async () => {
      if (at === "form") setOvertaken(invite.message);
      const r = await sendInvitationAgain({ email });
      setNote({ at, ok: r.ok, text: r.message ?? (r.ok ? "Sent again." : "That did not work.") });
      if (r.ok && at === "form") {
        setWaiting(null);
        invite.form.reset({ email: "", role: invite.form.getValues("role") });
      }
    });

  return (
    <div className="space-y-8">
      <section>
        <h2 className="mb-3 text-lg">Members</h2>
        <FormMessage message={message} />
        {/* relative: the header's screen-reader-only text is positioned absolutely; without it, it escapes the
            scrolling box and widens the page. */}
        <div className="card relative mt-3 overflow-x-auto">
          <table className="w-full text-left text-sm" aria-label="Members">
            <thead className="border-b border-hairline text-xs uppercase tracking-wide text-muted">
              <tr>
                <th className="px-3 py-2">Person</th>
                <th className="px-3 py-2">Role</th>
                <th className="hidden px-3 py-2 sm:table-cell">Member since</th>
                {manage ? (
                  <th className="px-3 py-2">
                    <span className="sr-only">Actions</span>
                  </th>
                ) : null}
              </tr>
            </thead>
            <tbody className="divide-y divide-hairline">
              {members.map((m) => (
                <tr key={m.userId} data-testid={`member-${m.email}`}>
                  <td className="px-3 py-2">
                    <span className="font-bold">{m.name ?? "—"}</span>
                    <span className="block text-xs text-muted">{m.email}</span>
                  </td>
                  <td className="px-3 py-2">
                    {manage ? (
                      <select
                        key={`${m.role}-${version}`}
                        aria-label={`Role of ${m.email}`}
                        className="rounded-card border border-hairline bg-surface px-2 py-1 capitalize"
                        defaultValue={m.role}
                        disabled={busy}
                        onChange={(e) => run(setMemberRole({ userId: m.userId, role: e.target.value as Role }))}
                      >
                        {ROLES.map((r) => (
                          <option key={r} value={r}>
                            {r}
                          </option>
                        ))}
                      </select>
                    ) : (
                      <span className="capitalize">{m.role}</span>
                    )}
                  </td>
                  <td className="hidden px-3 py-2 text-muted sm:table-cell">{day(m.since)}</td>
                  {manage ? (
                    <td className="px-3 py-2 text-right">
                      <button
                        type="button"
                        className="btn-quiet px-2 py-1 text-finding-error"
                        disabled={busy}
                        onClick={() => {
                          if (confirm(`Remove ${m.email} from this workspace?${m.userId === me ? " That is you." : ""}`))
                            run(dropMember({ userId: m.userId }));
                        }}
                      >
                        Remove
                      </button>
                    </td>
                  ) : null}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      {manage ? (
        <section className="grid gap-6 md:grid-cols-2">
          <form onSubmit={invite.onSubmit} className="card space-y-4 p-5" noValidate aria-label="Invite someone">
            <h2 className="text-lg">Invite someone</h2>
            <FormMessage message={note?.at === "form" ? note : invite.message !== overtaken ? invite.message : null} />
            <div>
              <Field form={invite.form} name="email" label="E-mail" type="email" autoComplete="off" />
              {waiting && waiting === typed?.trim().toLowerCase() ? (
                <button type="button" className="btn-quiet mt-2 px-3 py-1 text-sm" disabled={busy} onClick={() => again(waiting, "form")}>
                  Send again
                </button>
              ) : null}
            </div>
            <div>
              <label htmlFor="invite-role" className="block text-sm font-bold">
                Role
              </label>
              <select id="invite-role" className="field-input mt-1" {...invite.form.register("role")}>
                {ROLES.map((r) => (
                  <option key={r} value={r}>
                    {ROLE_LABEL[r]}
                  </option>
                ))}
              </select>
            </div>
            <Submit pending={invite.pending} pendingText="Sending…">
              Send invitation
            </Submit>
            <p className="text-xs text-muted">The link works once and expires in 7 days.</p>
          </form>
          <div>
            <h2 className="mb-3 text-lg">Waiting to be accepted</h2>
            {note?.at === "list" ? (
              <div className="mb-3">
                <FormMessage message={note} />
              </div>
            ) : null}
            {pending.length === 0 ? (
              <p className="text-sm text-muted">No invitations are waiting.</p>
            ) : (
              <ul className="card divide-y divide-hairline text-sm">
                {pending.map((p) => (
                  <li
                    key={p.id}
                    className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1 px-3 py-2"
                    data-testid={`invitation-${p.email}`}
                  >
                    <span className="min-w-0 break-words">
                      {p.email} · <span className="capitalize">{p.role}</span>
                      <span className="block text-xs text-muted">
                        sent {day(p.sentAt)} · expires {day(p.expiresAt)}
                      </span>
                    </span>
                    <span className="flex gap-1">
                      <button type="button" className="btn-quiet px-2 py-1" disabled={busy} onClick={() => again(p.email, "list")}>
                        Send again
                      </button>
                      <button
                        type="button"
                        className="btn-quiet px-2 py-1"
                        disabled={busy}
                        onClick={() => run(withdrawInvitation({ id: p.id }))}
                      >
                        Withdraw
                      </button>
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </div>
        </section>
      ) : (
        <p className="text-sm text-muted">Only owners can invite people, change roles and remove members.</p>
      )}
    </div>
  );
}
