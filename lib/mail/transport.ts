// One SMTP transport per process (the local fake in development, a relay in production: only SMTP_URL changes).
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "@/lib/env";

let transport: Transporter | undefined;

export function mailTransport(): Transporter {
  // Short timeouts: a mail outage must surface as a failed (and later retried) mail job, not a hung worker.
  transport ??= nodemailer.createTransport(env.SMTP_URL, {
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  } as never);
  return transport;
}

export function closeMailTransport(): void {
  transport?.close();
  transport = undefined;
}
