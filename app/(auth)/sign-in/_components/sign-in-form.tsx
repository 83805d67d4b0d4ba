"use client";

import { useActionState } from "react";
import { signInWithPassword, type SignInState } from "../actions";

export function SignInForm() {
  const [state, action, pending] = useActionState<SignInState, FormData>(signInWithPassword, { ok: false });
  return (
    <form action={action} className="card space-y-4 p-6" noValidate>
      {state.message ? (
        <p className="rounded-card border border-finding-error/40 bg-finding-error/5 px-3 py-2 text-sm text-finding-error" data-testid="form-message">
          <span aria-hidden="true">✕ </span>
          {state.message}
        </p>
      ) : null}
      <div>
        <label htmlFor="email" className="block text-sm font-bold">
          E-mail
        </label>
        <input id="email" name="email" type="email" autoComplete="email" className="field-input mt-1" defaultValue={state.values?.email} aria-invalid={Boolean(state.fieldErrors?.email)} aria-describedby="email-error" />
        {state.fieldErrors?.email ? (
          <p id="email-error" className="mt-1 text-sm text-finding-error">
            {state.fieldErrors.email[0]}
          </p>
        ) : null}
      </div>
      <div>
        <label htmlFor="password" className="block text-sm font-bold">
          Password
        </label>
        <input id="password" name="password" type="password" autoComplete="current-password" className="field-input mt-1" aria-invalid={Boolean(state.fieldErrors?.password)} aria-describedby="password-error" />
        {state.fieldErrors?.password ? (
          <p id="password-error" className="mt-1 text-sm text-finding-error">
            {state.fieldErrors.password[0]}
          </p>
        ) : null}
      </div>
      <button type="submit" className="btn-primary w-full" disabled={pending}>
        {pending ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
