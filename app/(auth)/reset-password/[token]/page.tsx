import type { Metadata } from "next";
import { ResetConfirmForm } from "../_components/reset-forms";

export const metadata: Metadata = { title: "Choose a new password" };

export default async function ResetConfirmPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  return (
    <div>
      <h1 className="text-xl">Choose a new password</h1>
      <div className="mt-6">
        <ResetConfirmForm token={token} />
      </div>
    </div>
  );
}
