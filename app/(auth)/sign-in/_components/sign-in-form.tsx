"use client";

import Link from "next/link";
import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import { magicLinkSchema, signInSchema } from "@/lib/validation/accounts";
import { sendSignInLink, signInWithPassword } from "../../actions";

export function SignInForm({ next, email }: { next?: string; email?: string }) {
  const pw = useServerForm(signInSchema, (v) => signInWithPassword({ ...v, next }), { email: email ?? "", password: "" });
  const link = useServerForm(magicLinkSchema, (v) => sendSignInLink({ ...v, next }), { email: email ?? "" });
  return (
    <div className="space-y-4">
      <form onSubmit={pw.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Sign in with a password">
        <FormMessage message={pw.message} />
        <Field form={pw.form} name="email" label="E-mail" type="email" autoComplete="email" />
        <Field form={pw.form} name="password" label="Password" type="password" autoComplete="current-password" />
        <div className="flex flex-wrap items-center justify-between gap-3">
          <Submit pending={pw.pending} pendingText="Signing in…">
            Sign in
          </Submit>
          <Link href="/reset-password" className="text-sm text-accent underline">
            Forgot your password?
          </Link>
        </div>
      </form>
      <form onSubmit={link.onSubmit} className="card space-y-3 p-6" noValidate aria-label="Sign in by e-mail link">
        <p className="text-sm text-muted">No password? We can e-mail you a link that signs you in once.</p>
        <FormMessage message={link.message} />
        <Field form={link.form} name="email" label="E-mail for the link" type="email" autoComplete="email" />
        <button type="submit" className="btn-quiet" disabled={link.pending}>
          {link.pending ? "Sending…" : "E-mail me a sign-in link"}
        </button>
      </form>
    </div>
  );
}
