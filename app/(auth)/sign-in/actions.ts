"use server";

import { AuthError } from "next-auth";
import { z } from "zod";
import { signIn } from "@/lib/auth/config";

export type SignInState = {
  ok: boolean;
  message?: string;
  fieldErrors?: { email?: string[]; password?: string[] };
  values?: { email: string };
};

const schema = z.object({
  email: z.string().trim().toLowerCase().email("Enter an e-mail address like name@example.com."),
  password: z.string().min(1, "Enter your password."),
});

export async function signInWithPassword(_prev: SignInState, form: FormData): Promise<SignInState> {
  const parsed = schema.safeParse({ email: form.get("email"), password: form.get("password") });
  const email = String(form.get("email") ?? "");
  if (!parsed.success) {
    return { ok: false, fieldErrors: z.flattenError(parsed.error).fieldErrors, values: { email } };
  }
  try {
    // On success signIn throws Next's redirect, which must propagate.
    await signIn("credentials", { ...parsed.data, redirectTo: "/parts" });
  } catch (err) {
    if (err instanceof AuthError) {
      return { ok: false, message: "That e-mail and password do not match an account.", values: { email } };
    }
    throw err;
  }
  return { ok: true };
}
