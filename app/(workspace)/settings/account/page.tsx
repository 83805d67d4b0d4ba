import type { Metadata } from "next";
import { requireCaller } from "@/lib/auth/guards";
import { AccountForms } from "./_components/account-forms";

export const metadata: Metadata = { title: "Your account" };

export default async function AccountPage() {
  const caller = await requireCaller();
  return <AccountForms email={caller.user.email} />;
}
