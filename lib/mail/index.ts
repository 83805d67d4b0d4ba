import "server-only";
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/lib/env";
import { WORKSPACE_HEADER } from "./headers";

/**
 * Outgoing mail behind one small interface; the rest of the app never imports nodemailer. The
 * transport comes from SMTP_URL: our fake SMTP server on loopback in development and tests, a real
 * relay in a deployment.
 */
export type Message = {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /**
   * The workspace a message is sent for (an invitation, a note to a plate's maker). Travels as a
   * header so the demo outbox shows it to that workspace's owners; account mail (sign-in and reset
   * links) has none and is shown only to the person it is addressed to.
   */
  workspaceId?: string;
};

export { WORKSPACE_HEADER };

let transport: Transporter | undefined;

function transporter(): Transporter {
  transport ??= nodemailer.createTransport(env().SMTP_URL);
  return transport;
}

export async function sendMail({ workspaceId, ...message }: Message): Promise<void> {
  await transporter().sendMail({
    from: env().MAIL_FROM,
    ...message,
    headers: workspaceId ? { [WORKSPACE_HEADER]: workspaceId } : undefined,
  });
}

export function appUrl(path: string): string {
  return new URL(path, env().AUTH_URL).toString();
}

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c]!);

/** A plain, readable message with one link, as text and as simple HTML. */
export function linkMessage(to: string, subject: string, lead: string, action: string, url: string, foot: string): Message {
  return linksMessage(to, subject, lead, [{ action, url }], foot);
}

/** The same with several links, each on its own line. */
export function linksMessage(to: string, subject: string, lead: string, links: { action: string; url: string }[], foot: string): Message {
  return {
    to,
    subject,
    text: `${lead}\n\n${links.map((l) => `${l.action}: ${l.url}`).join("\n")}\n\n${foot}\n\n— Slabwright`,
    html:
      `<p>${esc(lead)}</p>${links.map((l) => `<p><a href="${esc(l.url)}">${esc(l.action)}</a></p>`).join("")}<p ` +
      `style="color:#5c6370">${esc(foot)}</p><p>— Slabwright</p>`,
  };
}
