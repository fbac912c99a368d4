import { env } from "@/lib/server/env";
import { makeMailer, type Mailer } from "@/lib/server/mail/mail";

let mailer: Mailer | null | undefined;

// The one SMTP transport of a process (the app or the ingest service); null when SMTP_PORT is unset.
export function appMailer(): Mailer | null {
  if (mailer !== undefined) return mailer;
  const e = env();
  mailer = e.SMTP_PORT ? makeMailer({ host: e.SMTP_HOST, port: e.SMTP_PORT, from: e.MAIL_FROM }) : null;
  return mailer;
}

export const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);
