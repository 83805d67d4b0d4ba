"use client";

import { useTransition } from "react";
import { useToast } from "@/app/_components/toasts";
import { checkoutAction, portalAction } from "./actions";

/** Off to the payment provider's hosted page (checkout or the billing portal). */
export function UpgradeButton({ plan, label }: { plan: "workshop" | "farm"; label: string }) {
  const toast = useToast();
  const [pending, start] = useTransition();
  return (
    <button
      type="button"
      className="btn-primary px-3 py-1.5 text-sm"
      disabled={pending}
      onClick={() =>
        start(async () => {
          const r = await checkoutAction({ plan });
          if (r.ok) window.location.assign(r.data.url);
          else toast("problem", r.message);
        })
      }
    >
      {label}
    </button>
  );
}

export function PortalButton() {
  const toast = useToast();
  const [pending, start] = useTransition();
  return (
    <button
      type="button"
      className="btn-quiet px-3 py-1.5 text-sm"
      disabled={pending}
      onClick={() =>
        start(async () => {
          const r = await portalAction({});
          if (r.ok) window.location.assign(r.data.url);
          else toast("problem", r.message);
        })
      }
    >
      Manage billing
    </button>
  );
}
