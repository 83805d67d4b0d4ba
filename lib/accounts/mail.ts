import "server-only";
import type { Role } from "@/db/schema";
import { aOrAn } from "@/lib/format";
import { appUrl, linkMessage, linksMessage, type Message } from "@/lib/mail";

/** The account mail's wording: what each message says and where its links lead. */

export function signUpLinkMessage(email: string, name: string, token: string, hours: number): Message {
  return linkMessage(
    email,
    "Finish creating your Slabwright account",
    `Someone (we hope you) asked to create a Slabwright account for this address, as ${name}.`,
    "Finish creating the account",
    appUrl(`/sign-up/confirm/${token}`),
    `The link works once, for ${hours} hours. If you did not ask for it, ignore this message and no account is made.`,
  );
}

/** Sign-up with an address that has an account already: how to sign in, and nothing changed. */
export function existingAccountMessage(email: string): Message {
  return linksMessage(
    email,
    "Someone tried to create a Slabwright account with your address",
    "Someone (perhaps you) tried to create a new Slabwright account with this e-mail address, which already has one. Nothing was " +
      "changed and nobody was signed in.",
    [
      { action: "Sign in", url: appUrl("/sign-in") },
      { action: "Choose a password (forgotten, or never set one)", url: appUrl("/reset-password") },
    ],
    "If it was not you, you need do nothing: your account stays as it is.",
  );
}

export function invitationMessage(
  invitation: { email: string; role: Role; token: string; days: number },
  from: { inviter: string; workspaceId: string; workspaceName: string },
): Message {
  return {
    workspaceId: from.workspaceId,
    ...linkMessage(
      invitation.email,
      `${from.inviter} invited you to ${from.workspaceName} on Slabwright`,
      `${from.inviter} invited you to join ${from.workspaceName} on Slabwright as ` + `${aOrAn(invitation.role)}.`,
      "Accept the invitation",
      appUrl(`/invite/${invitation.token}`),
      `The link works once and expires in ${invitation.days} days.`,
    ),
  };
}

export function passwordResetMessage(email: string, token: string, minutes: number): Message {
  return linkMessage(
    email,
    "Reset your Slabwright password",
    "Someone (we hope you) asked to reset the password for this address.",
    "Choose a new password",
    appUrl(`/reset-password/${token}`),
    `The link works once, for ${minutes} minutes. If you did not ask, ignore this message; your password stays as it is.`,
  );
}

/** A reset asked for an address without an account: the same one mail, saying so. */
export function noAccountResetMessage(email: string): Message {
  return linkMessage(
    email,
    "About your Slabwright password",
    "Someone (we hope you) asked to reset the Slabwright password for this address, but no account uses it. Perhaps you signed up " +
      "with another address?",
    "Create an account",
    appUrl("/sign-up"),
    "If you did not ask, ignore this message.",
  );
}
