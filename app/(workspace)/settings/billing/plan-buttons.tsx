"use client";

import { useRouter } from "next/navigation";
import { useEffect, useState, useTransition } from "react";
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

/** While a checkout waits for the provider's confirmation: reload the page's data every few seconds, for two minutes at most. */
export function RefreshWhileConfirming() {
  const router = useRouter();
  const [gaveUp, setGaveUp] = useState(false);
  useEffect(() => {
    const started = Date.now();
    const t = setInterval(() => {
      if (Date.now() - started > 120_000) {
        clearInterval(t);
        setGaveUp(true);
      } else router.refresh();
    }, 3000);
    return () => clearInterval(t);
  }, [router]);
  return gaveUp ? (
    <p className="mt-1 text-muted">
      No confirmation yet. Nothing is lost: reload this page later, or open Manage billing to see the payment.
    </p>
  ) : null;
}
