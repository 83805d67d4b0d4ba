"use client";

import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import { PASSWORD_MIN, resetConfirmSchema, resetRequestSchema } from "@/lib/validation/accounts";
import { askPasswordReset, confirmPasswordReset } from "../../actions";

export function ResetRequestForm() {
  const f = useServerForm(resetRequestSchema, askPasswordReset, { email: "" });
  return (
    <form onSubmit={f.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Ask for a reset link">
      <FormMessage message={f.message} />
      <Field form={f.form} name="email" label="E-mail" type="email" autoComplete="email" />
      <Submit pending={f.pending} pendingText="Sending…">
        E-mail me a reset link
      </Submit>
    </form>
  );
}

export function ResetConfirmForm({ token }: { token: string }) {
  const f = useServerForm(resetConfirmSchema, confirmPasswordReset, { token, email: "", password: "" });
  return (
    <form onSubmit={f.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Choose a new password">
      <FormMessage message={f.message} />
      <Field form={f.form} name="email" label="E-mail" type="email" autoComplete="email" />
      <Field
        form={f.form}
        name="password"
        label="New password"
        type="password"
        autoComplete="new-password"
        hint={`At least ${PASSWORD_MIN} characters, and not your e-mail address.`}
      />
      <Submit pending={f.pending} pendingText="Saving…">
        Save and sign in
      </Submit>
    </form>
  );
}
