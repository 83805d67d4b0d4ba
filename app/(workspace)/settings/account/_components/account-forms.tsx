"use client";

import { useTransition } from "react";
import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import { changePasswordSchema, PASSWORD_MIN } from "@/lib/validation/accounts";
import { changeMyPassword, signOutEverywhere } from "../actions";

export function AccountForms({ email }: { email: string }) {
  const f = useServerForm(
    changePasswordSchema,
    (v) => changeMyPassword(v),
    { current: "", password: "" },
    (_res, form) => form.reset(),
  );
  const [pending, start] = useTransition();
  return (
    <div className="grid gap-6 md:grid-cols-2">
      <form onSubmit={f.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Change your password">
        <h2 className="text-lg">Password</h2>
        <p className="text-sm text-muted">You sign in as {email}.</p>
        <FormMessage message={f.message} />
        <Field form={f.form} name="current" label="Present password" type="password" autoComplete="current-password" />
        <Field
          form={f.form}
          name="password"
          label="New password"
          type="password"
          autoComplete="new-password"
          hint={`At least ${PASSWORD_MIN} characters, and not your e-mail address.`}
        />
        <Submit pending={f.pending} pendingText="Changing…">
          Change password
        </Submit>
      </form>
      <section className="card space-y-3 p-6" aria-label="Sessions">
        <h2 className="text-lg">Sessions</h2>
        <p className="text-sm text-muted">
          Signed in on a shared computer, or lost a phone? End every session of yours at once, this one included; you sign in again
          afterwards.
        </p>
        <button type="button" className="btn-quiet" disabled={pending} onClick={() => start(() => signOutEverywhere())}>
          {pending ? "Signing out…" : "Sign out everywhere"}
        </button>
      </section>
    </div>
  );
}
