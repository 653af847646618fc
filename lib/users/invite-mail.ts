// The invitation e-mail: a one-time link to choose a password. Sent through SMTP_URL (maildev locally).
import nodemailer from "nodemailer";
import { env } from "../env";
import { ROLE_LABELS, type Role } from "../auth/policy";

let transport: nodemailer.Transporter | undefined;
function mailer(): nodemailer.Transporter {
  transport ??= nodemailer.createTransport(env.SMTP_URL);
  return transport;
}

export function setPasswordUrl(token: string): string {
  return new URL(`/set-password/${token}`, env.APP_URL).toString();
}

export async function sendInviteMail(to: { name: string; email: string }, role: Role, token: string, expiresAt: Date) {
  const link = setPasswordUrl(token);
  const until = expiresAt.toISOString().replace("T", " ").slice(0, 16) + " UTC";
  await mailer().sendMail({
    from: env.MAIL_FROM,
    to: { name: to.name, address: to.email },
    subject: "Your Tympan account",
    text: [
      `Hello ${to.name},`,
      "",
      `An account has been opened for you in Tympan with the role ${ROLE_LABELS[role]}.`,
      "Choose your password with this link. It works once and expires on " + until + ":",
      "",
      link,
      "",
      "If you did not expect this e-mail, you can ignore it.",
    ].join("\n"),
  });
}
