import createDebug from "debug";
import nodemailer from "nodemailer";

const log = createDebug("wormward:mail");

export interface MailerOptions {
  host: string;
  port: number;
  from: string;
  // Implicit TLS (port 465); otherwise STARTTLS is used when the server offers it.
  secure?: boolean;
  auth?: { user: string; pass: string };
}

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<{ messageId: string }>;
  close(): void;
}

export function makeMailer(options: MailerOptions): Mailer {
  const transport = nodemailer.createTransport({
    host: options.host,
    port: options.port,
    secure: options.secure ?? false,
    // nodemailer waits up to 2 min to connect and 10 min on a quiet socket; an alert's e-mail
    // must end well inside a delivery worker's lease.
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
    ...(options.auth ? { auth: options.auth } : {}),
  });
  return {
    async send(mail) {
      const info = await transport.sendMail({
        from: options.from,
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        ...(mail.html === undefined ? {} : { html: mail.html }),
      });
      // Recipients are personal data; the message id is enough to trace a send.
      log("sent %s to %d recipient(s) via %s:%d", info.messageId, info.accepted.length, options.host, options.port);
      return { messageId: info.messageId };
    },
    close: () => transport.close(),
  };
}
