import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { eq } from "drizzle-orm";
import NextAuth, { CredentialsSignin } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import Nodemailer from "next-auth/providers/nodemailer";
import { z } from "zod";
import { db } from "@/db";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";
import { audit } from "@/lib/audit";
import { env } from "@/lib/env";
import { linkMessage, sendMail } from "@/lib/mail";
import { verifyPassword } from "./password";
import { hit, isBlocked, LIMITS } from "./rate-limit";
import { clientIp } from "./request";

const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().email(),
  password: z.string().min(1).max(200),
});

class BadCredentials extends CredentialsSignin {
  code = "bad_credentials";
}
/** The wait travels in the code, since that is what Auth.js hands back to the form. */
class TooManyAttempts extends CredentialsSignin {
  constructor(seconds: number) {
    super();
    this.code = `rate_limited:${seconds}`;
  }
}

/** Sessions last 12 hours; the token is refreshed while the person keeps working. */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;
/** Sign-in links by e-mail work for 15 minutes, once. */
export const MAGIC_LINK_MAX_AGE_S = 15 * 60;

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
  pages: { signIn: "/sign-in", verifyRequest: "/check-email", error: "/sign-in" },
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
      async authorize(raw, request) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) throw new BadCredentials();
        const { email, password } = parsed.data;
        const ip = await clientIp(request.headers);
        const byAccount = await isBlocked(`signin:acct:${email}`, LIMITS.signInPerAccount);
        const byIp = await isBlocked(`signin:ip:${ip}`, LIMITS.signInPerIp);
        if (byAccount.blocked || byIp.blocked) throw new TooManyAttempts(Math.max(byAccount.blocked ? byAccount.retryAfter : 0, byIp.blocked ? byIp.retryAfter : 0));
        const [user] = await db().select().from(users).where(eq(users.email, email)).limit(1);
        const ok = await verifyPassword(password, user?.passwordHash);
        if (!user || !ok) {
          await hit(`signin:acct:${email}`, LIMITS.signInPerAccount);
          await hit(`signin:ip:${ip}`, LIMITS.signInPerIp);
          await audit({ action: "sign_in_failed", actorUserId: user?.id ?? null, actorEmail: email, ip });
          throw new BadCredentials();
        }
        await audit({ action: "sign_in", actorUserId: user.id, actorEmail: email, ip, details: { method: "password" } });
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
    Nodemailer({
      server: env().SMTP_URL,
      from: env().MAIL_FROM,
      maxAge: MAGIC_LINK_MAX_AGE_S,
      async sendVerificationRequest({ identifier, url }) {
        await sendMail(
          linkMessage(identifier, "Your Slabwright sign-in link", "Someone (we hope you) asked to sign in to Slabwright with this address.", "Sign in", url, "The link works once, for 15 minutes. If you did not ask for it, ignore this message."),
        );
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
  events: {
    async signIn({ user, account }) {
      if (account?.provider === "nodemailer" && user.id) {
        await audit({ action: "sign_in", actorUserId: user.id, actorEmail: user.email ?? null, details: { method: "email link" } });
      }
    },
  },
});
