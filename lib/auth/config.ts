import { randomUUID } from "node:crypto";
import NextAuth, { CredentialsSignin } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import Nodemailer from "next-auth/providers/nodemailer";
import { z } from "zod";
import { authAdapter } from "@/db/queries/auth-adapter";
import { revokeSession, sessionStillValid, sessionVersionOf, userByEmail } from "@/db/queries/users";
import { finishSignUp } from "@/lib/accounts/sign-up";
import { audit } from "@/lib/audit";
import { env } from "@/lib/env";
import { linkMessage, sendMail } from "@/lib/mail";
import { checkPassword } from "./password";
import { isBlocked, signInFailed, signInSucceeded, signInWait } from "./rate-limit";
import { clientIp } from "./request";
import { AppError } from "@/lib/errors";

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
  adapter: authAdapter(),
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
        // The client's address is stopped outright past its limit; an account is only slowed (each
        // wrong password past the free ones makes it wait longer), so a stranger cannot lock its
        // owner out — and a sign-in by e-mailed link is never held back by either.
        const [byIp, wait] = await Promise.all([isBlocked("signInFailuresPerIp", ip), signInWait(email)]);
        if (byIp.blocked || wait > 0) throw new TooManyAttempts(Math.max(byIp.blocked ? byIp.retryAfter : 0, wait));
        const user = await userByEmail(email);
        // Checked against a stand-in hash when there is no password, so both take the same time.
        const ok = await checkPassword(password, user?.passwordHash);
        if (!user || !ok) {
          await signInFailed(email, ip);
          await audit({ action: "sign_in_failed", actorUserId: user?.id ?? null, actorEmail: email, ip });
          throw new BadCredentials();
        }
        await signInSucceeded(email);
        await audit({ action: "sign_in", actorUserId: user.id, actorEmail: email, ip, details: { method: "password" } });
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
    // The link mailed at sign-up: using it makes the account (lib/accounts/sign-up finishSignUp).
    Credentials({
      id: "sign-up-link",
      name: "Sign-up link",
      credentials: { token: { label: "Token" } },
      async authorize(raw, request) {
        const token = typeof raw?.token === "string" ? raw.token : "";
        if (token.length < 20 || token.length > 200) throw new BadCredentials();
        try {
          const user = await finishSignUp(token, await clientIp(request.headers));
          return { id: user.id, email: user.email, name: user.name };
        } catch (err) {
          if (err instanceof AppError) throw new BadCredentials();
          throw err;
        }
      },
    }),
    Nodemailer({
      server: env().SMTP_URL,
      from: env().MAIL_FROM,
      maxAge: MAGIC_LINK_MAX_AGE_S,
      async sendVerificationRequest({ identifier, url }) {
        await sendMail(
          linkMessage(
            identifier,
            "Your Slabwright sign-in link",
            "Someone (we hope you) asked to sign in to Slabwright with this address.",
            "Sign in",
            url,
            "The link works once, for 15 minutes. If you did not ask for it, ignore this message.",
          ),
        );
      },
    }),
  ],
  callbacks: {
    /**
     * Every token names its session (sid) and the person's session version at sign-in. On every
     * request the two are checked against the database: after "sign out everywhere", a password
     * change or reset the version has moved on, and a signed-out session is on the revoked list, so a
     * replayed cookie no longer works (null ends the session and clears the cookie).
     */
    async jwt({ token, user }) {
      if (user?.id) {
        const version = await sessionVersionOf(user.id);
        if (version === null) return null;
        return { ...token, sub: user.id, sid: randomUUID(), sv: version };
      }
      if (!token.sub || typeof token.sid !== "string" || typeof token.sv !== "number") return null;
      if (!(await sessionStillValid(token.sub, token.sv, token.sid))) return null;
      return token;
    },
    session({ session, token }) {
      if (token.sub) session.user.id = token.sub;
      return session;
    },
  },
  events: {
    async signOut(message) {
      const token = "token" in message ? message.token : null;
      if (token && typeof token.sid === "string") {
        await revokeSession(
          token.sid,
          token.sub ?? null,
          new Date((typeof token.exp === "number" ? token.exp : Date.now() / 1000 + SESSION_MAX_AGE_S) * 1000),
        );
      }
    },
    async signIn({ user, account }) {
      if (account?.provider === "nodemailer" && user.id) {
        await audit({ action: "sign_in", actorUserId: user.id, actorEmail: user.email ?? null, details: { method: "email link" } });
      }
    },
  },
});
