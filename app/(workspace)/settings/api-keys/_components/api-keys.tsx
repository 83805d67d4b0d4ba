"use client";

import { useState, useTransition } from "react";
import { FormMessage, Submit, useServerForm, Field } from "@/app/_components/form";
import { apiKeyScopes } from "@/db/schema/workspaces";
import { apiKeySchema } from "@/lib/validation/accounts";
import { day, when } from "@/lib/format";
import { dropApiKey, makeApiKey } from "../../actions";

type Key = {
  id: string;
  name: string;
  prefix: string;
  scopes: string[];
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
};

const SCOPE_HELP: Record<(typeof apiKeyScopes)[number], string> = {
  "plates:write": "make plates",
  "plates:read": "read plates and download their files",
  "kits:read": "list kits",
  "templates:read": "list templates",
};

export function ApiKeys({ keys }: { keys: Key[] }) {
  const [shown, setShown] = useState<string | null>(null);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, start] = useTransition();
  const f = useServerForm(apiKeySchema, makeApiKey, { name: "", scopes: ["plates:write", "plates:read"] }, (r, form) => {
    setShown(r.data.key);
    form.reset({ name: "", scopes: ["plates:write", "plates:read"] });
  });
  const scopeError = f.form.formState.errors.scopes?.message;
  return (
    <div className="grid gap-6 md:grid-cols-2">
      <div className="space-y-4">
        <form onSubmit={f.onSubmit} className="card space-y-4 p-5" noValidate aria-label="Create an API key">
          <h2 className="text-lg">New key</h2>
          <FormMessage message={f.message} />
          <Field form={f.form} name="name" label="Name" hint="After the system that will use it, e.g. “Order system”." />
          <fieldset>
            <legend className="text-sm font-bold">Scopes</legend>
            {apiKeyScopes.map((s) => (
              <label key={s} className="mt-1 flex items-center gap-2 text-sm">
                <input type="checkbox" value={s} {...f.form.register("scopes")} />
                <code className="font-mono">{s}</code> <span className="text-muted">— {SCOPE_HELP[s]}</span>
              </label>
            ))}
            {scopeError ? (
              <p className="mt-1 text-sm text-finding-error" data-testid="scopes-error">
                {String(scopeError)}
              </p>
            ) : null}
          </fieldset>
          <Submit pending={f.pending} pendingText="Creating…">
            Create key
          </Submit>
        </form>
        {shown ? (
          <div className="card border-accent p-4" data-testid="new-key">
            <p className="text-sm font-bold">Copy this key now: it is shown only once.</p>
            <code className="mt-2 block break-all rounded-card bg-paper p-2 font-mono text-sm">{shown}</code>
            <p className="mt-2 text-xs text-muted">
              Send it as <code className="font-mono">Authorization: Bearer &lt;key&gt;</code>. We keep only a hash of it.
            </p>
          </div>
        ) : null}
      </div>
      <div>
        <h2 className="mb-3 text-lg">Keys</h2>
        <FormMessage message={message} />
        {keys.length === 0 ? (
          <p className="text-sm text-muted">No keys yet: create one for each system that calls the API.</p>
        ) : (
          <ul className="card mt-2 divide-y divide-hairline text-sm">
            {keys.map((k) => (
              <li key={k.id} className="flex items-start justify-between gap-3 px-3 py-2" data-testid={`key-${k.prefix}`}>
                <span className="min-w-0">
                  <span className="break-words font-bold">{k.name}</span>{" "}
                  <code data-literal className="whitespace-nowrap font-mono text-muted">
                    swk_{k.prefix}…
                  </code>
                  {/* Each fact stays on one line: a date never breaks from its time. */}
                  <span className="block text-xs text-muted">
                    {k.scopes.join(", ")} ·{" "}
                    <span className="whitespace-nowrap">last used {k.lastUsedAt ? `${when(k.lastUsedAt)} UTC` : "never"}</span>
                    {k.revokedAt ? (
                      <>
                        {" "}
                        · <span className="whitespace-nowrap">revoked {day(k.revokedAt)}</span>
                      </>
                    ) : null}
                  </span>
                </span>
                {k.revokedAt ? (
                  <span className="text-xs text-muted">revoked</span>
                ) : (
                  <button
                    type="button"
                    className="btn-quiet px-2 py-1 text-finding-error"
                    disabled={busy}
                    onClick={() => {
                      if (confirm(`Revoke ${k.name}? Systems using it will be refused at once.`))
                        start(async () => {
                          const r = await dropApiKey({ id: k.id });
                          setMessage({ ok: r.ok, text: r.message ?? "" });
                        });
                    }}
                  >
                    Revoke
                  </button>
                )}
              </li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}
