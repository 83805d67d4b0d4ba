"use client";

import { useTransition } from "react";
import { useToast } from "@/app/_components/toasts";
import { checkoutAction, portalAction } from "./actions";

/** Off to the payment provider's hosted page: checkout for a plan, or the billing portal. */
function ProviderButton({
  go,
  label,
  primary,
}: {
  go: () => Promise<{ ok: true; data: { url: string } } | { ok: false; message: string }>;
  label: string;
  primary?: boolean;
}) {
  const toast = useToast();
  const [pending, start] = useTransition();
  return (
    <button
      type="button"
      className={`${primary ? "btn-primary" : "btn-quiet"} px-3 py-1.5 text-sm`}
      disabled={pending}
      onClick={() =>
        start(async () => {
          const r = await go();
          if (r.ok) window.location.assign(r.data.url);
          else toast("problem", r.message);
        })
      }
    >
      {label}
    </button>
  );
}

export function UpgradeButton({ plan, label }: { plan: "workshop" | "farm"; label: string }) {
  return <ProviderButton go={() => checkoutAction({ plan })} label={label} primary />;
}

export function PortalButton() {
  return <ProviderButton go={() => portalAction({})} label="Manage billing" />;
}
