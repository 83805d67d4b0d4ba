import "server-only";
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/lib/env";

/**
 * Outgoing mail behind one small interface; the rest of the app never imports nodemailer. The
 * transport comes from SMTP_URL: our fake SMTP server on loopback in development and tests, a real
 * relay in a deployment.
 */
export type Message = { to: string; subject: string; text: string; html?: string };

let transport: Transporter | undefined;

function transporter(): Transporter {
  transport ??= nodemailer.createTransport(env().SMTP_URL);
  return transport;
}

export async function sendMail(message: Message): Promise<void> {
  await transporter().sendMail({ from: env().MAIL_FROM, ...message });
}

export function appUrl(path: string): string {
  return new URL(path, env().AUTH_URL).toString();
}

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c]!);

/** A plain, readable message with one link, as text and as simple HTML. */
export function linkMessage(to: string, subject: string, lead: string, action: string, url: string, foot: string): Message {
  return {
    to,
    subject,
    text: `${lead}\n\n${action}: ${url}\n\n${foot}\n\n— Slabwright`,
    html: `<p>${esc(lead)}</p><p><a href="${esc(url)}">${esc(action)}</a></p><p style="color:#5c6370">${esc(foot)}</p><p>— Slabwright</p>`,
  };
}
