import type { Metadata } from "next";
import { ResetRequestForm } from "./_components/reset-forms";

export const metadata: Metadata = { title: "Reset your password" };

export default function ResetPasswordPage() {
  return (
    <div>
      <h1 className="text-xl">Reset your password</h1>
      <p className="mt-2 text-sm text-muted">Enter the address you sign in with; we will e-mail you a link to choose a new password.</p>
      <div className="mt-6">
        <ResetRequestForm />
      </div>
    </div>
  );
}
