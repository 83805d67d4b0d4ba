import type { DefaultSession } from "next-auth";

declare module "next-auth" {
  interface Session {
    user: { id: string } & DefaultSession["user"];
  }
}

declare module "@auth/core/jwt" {
  interface JWT {
    /** This session's own id, put on the revoked list when it signs out. */
    sid?: string;
    /** The person's session version when the token was issued (lib/auth/config.ts). */
    sv?: number;
  }
}
