"use client";

import { useRouter } from "next/navigation";
import { Field, FormMessage, Submit, useServerForm } from "@/app/_components/form";
import { HOME } from "@/lib/auth/landing";
import { workspaceSchema } from "@/lib/validation/accounts";
import { createFirstWorkspace } from "@/app/(auth)/actions";

export function WorkspaceForm() {
  const router = useRouter();
  const f = useServerForm(workspaceSchema, createFirstWorkspace, { name: "" }, () => router.push(HOME));
  return (
    <form onSubmit={f.onSubmit} className="card space-y-4 p-6" noValidate aria-label="Create a workshop">
      <FormMessage message={f.message} />
      <Field form={f.form} name="name" label="Workshop name" hint="Your shop or print farm." />
      <Submit pending={f.pending} pendingText="Creating…">
        Create workshop
      </Submit>
    </form>
  );
}
