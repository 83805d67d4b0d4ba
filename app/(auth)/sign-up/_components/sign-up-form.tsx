"use client";

import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import { PASSWORD_MIN, signUpSchema } from "@/lib/validation/accounts";
import { signUp } from "../../actions";

export function SignUpForm({ next, email, invited }: { next?: string; email?: string; invited: boolean }) {
  const f = useServerForm(signUpSchema, (v) => signUp({ ...v, next }), { name: "", email: email ?? "", password: "", workshop: "" });
  return (
    <form onSubmit={f.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Create an account">
      <FormMessage message={f.message} />
      <Field form={f.form} name="name" label="Your name" autoComplete="name" />
      <Field form={f.form} name="email" label="E-mail" type="email" autoComplete="email" />
      <Field
        form={f.form}
        name="password"
        label="Password"
        type="password"
        autoComplete="new-password"
        hint={`At least ${PASSWORD_MIN} characters, and not your e-mail address.`}
      />
      {invited ? null : (
        <Field
          form={f.form}
          name="workshop"
          label="Workshop name (optional)"
          hint="Your shop or print farm; you can invite people into it later."
        />
      )}
      <Submit pending={f.pending} pendingText="Creating your account…">
        Create account
      </Submit>
    </form>
  );
}
