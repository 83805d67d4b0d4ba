import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { eq } from "drizzle-orm";
import NextAuth, { CredentialsSignin } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { z } from "zod";
import { db } from "@/db";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { verifyPassword } from "./password";

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email(),
  password: z.string().min(1).max(200),
});

class BadCredentials extends CredentialsSignin {
  code = "bad_credentials";
}

/** Sessions last 12 hours; the token is refreshed while the person keeps working. */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

export const { handlers, auth, signIn, signOut } = NextAuth({
  adapter: DrizzleAdapter(db(), {
    usersTable: users,
    accountsTable: accounts,
    sessionsTable: sessions,
    verificationTokensTable: verificationTokens,
  }),
  // Credentials sign-in only works with JWT sessions; membership and role are still read from the
  // database on every request (lib/auth/guards.ts), never trusted from the token.
  session: { strategy: "jwt", maxAge: SESSION_MAX_AGE_S, updateAge: 15 * 60 },
  trustHost: true,
  pages: { signIn: "/sign-in" },
  // A wrong password is an expected outcome, answered on the form; keep it out of the error log.
  logger: {
    error(error) {
      const name = (error as { type?: string }).type ?? error.name;
      if (name === "CredentialsSignin") return;
      console.error("[auth]", error);
    },
  },
  providers: [
    Credentials({
      credentials: { email: { label: "E-mail" }, password: { label: "Password", type: "password" } },
      async authorize(raw) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) throw new BadCredentials();
        const [user] = await db().select().from(users).where(eq(users.email, parsed.data.email)).limit(1);
        const ok = await verifyPassword(parsed.data.password, user?.passwordHash);
        if (!user || !ok) throw new BadCredentials();
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user?.id) token.sub = user.id;
      return token;
    },
    session({ session, token }) {
      if (token.sub) session.user.id = token.sub;
      return session;
    },
  },
});
