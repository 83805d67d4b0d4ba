/**
 * A finding's or refusal's code, for support and the API, behind a "Details" disclosure: people read
 * the sentence beside it, not the code.
 */
export function CodeDetails({ code }: { code: string }) {
  return (
    <details className="ml-1 inline-block align-baseline text-xs text-muted">
      <summary className="cursor-pointer select-none underline">Details</summary>
      <code className="font-mono">{code}</code>
    </details>
  );
}
