"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useId, useState, type InputHTMLAttributes, type ReactNode } from "react";
import { useForm, type DefaultValues, type FieldValues, type Path, type UseFormReturn } from "react-hook-form";
import type { z } from "zod";
import type { ActionResult } from "@/lib/validation/accounts";

/**
 * A react-hook-form form bound to a server action. The same zod schema checks the fields here
 * (at once, per field) and in the action (again, on the server); the action's field errors are shown
 * at their fields, its message above the button.
 */
export function useServerForm<T extends FieldValues, R>(
  schema: z.ZodType<T, T>,
  action: (values: T) => Promise<ActionResult<R>>,
  defaultValues: DefaultValues<T>,
  onDone?: (result: { ok: true; data: R; message?: string }, form: UseFormReturn<T>) => void,
) {
  const form = useForm<T>({ resolver: zodResolver(schema), defaultValues });
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setMessage(null);
    const res = await action(values);
    if (!res.ok) {
      for (const [name, errs] of Object.entries(res.fieldErrors ?? {})) {
        if (errs?.[0]) form.setError(name as Path<T>, { type: "server", message: errs[0] });
      }
      setMessage({ ok: false, text: res.message });
      return;
    }
    if (res.message) setMessage({ ok: true, text: res.message });
    onDone?.(res, form);
  });
  return { form, onSubmit, message, pending: form.formState.isSubmitting };
}

export function Field<T extends FieldValues>({
  form,
  name,
  label,
  hint,
  ...input
}: { form: UseFormReturn<T>; name: Path<T>; label: string; hint?: string } & Omit<InputHTMLAttributes<HTMLInputElement>, "form" | "name">) {
  const error = form.formState.errors[name]?.message as string | undefined;
  // Unique per form: two forms on one page (password and e-mailed link) both have an e-mail field.
  const id = `${useId()}-${String(name)}`;
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-bold">
        {label}
      </label>
      <input
        id={id}
        className="field-input mt-1"
        aria-invalid={Boolean(error)}
        aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}
        {...input}
        {...form.register(name)}
      />
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-sm text-finding-error" data-testid={`${String(name)}-error`}>
          {error}
        </p>
      ) : hint ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-muted">
          {hint}
        </p>
      ) : null}
    </div>
  );
}

export function FormMessage({ message }: { message: { ok: boolean; text: string } | null }) {
  if (!message) return null;
  return (
    <p
      data-testid="form-message"
      className={
        `rounded-card border px-3 py-2 text-sm ` +
        `${message.ok ? "border-accent/40 bg-accent-soft text-ink" : "border-finding-error/40 bg-finding-error/5 text-finding-error"}`
      }
    >
      <span aria-hidden="true">{message.ok ? "✓ " : "✕ "}</span>
      {message.text}
    </p>
  );
}

export function Submit({ pending, children, pendingText }: { pending: boolean; children: ReactNode; pendingText: string }) {
  return (
    <button type="submit" className="btn-primary w-full sm:w-auto" disabled={pending}>
      {pending ? pendingText : children}
    </button>
  );
}
