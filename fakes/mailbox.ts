// A loopback SMTP mailbox that keeps every mail and shows it over HTTP, standing in for a real relay.
import { randomBytes } from "node:crypto";
import { realpathSync } from "node:fs";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import createDebug from "debug";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";

const log = createDebug("wormward:mailbox");

export interface KeptMail {
  id: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  receivedAt: string;
}

export interface Mailbox {
  smtpPort: number;
  httpUrl: string;
  messages(): KeptMail[];
  clear(): void;
  close(): Promise<void>;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);

function page(mails: KeptMail[]): string {
  const items = mails
    .slice()
    .reverse()
    .map(
      (m) => `<article><h2>${escapeHtml(m.subject || "(no subject)")}</h2>
<p><small>${escapeHtml(m.receivedAt)} · from ${escapeHtml(m.from)} · to ${escapeHtml(m.to.join(", "))}</small></p>
<pre>${escapeHtml(m.text)}</pre></article>`,
    )
    .join("\n");
  return `<!doctype html><html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1"><title>Wormward mailbox</title>
<style>body{font-family:system-ui,sans-serif;margin:1rem;max-width:48rem}
article{border-top:1px solid #8a7a66;padding:.5rem 0}pre{white-space:pre-wrap}</style>
</head><body><h1>Wormward mailbox (${mails.length})</h1>
${items || "<p>No mail yet.</p>"}</body></html>`;
}

export async function startMailbox(options: { smtpPort?: number; httpPort?: number; host?: string } = {}): Promise<Mailbox> {
  const host = options.host ?? "127.0.0.1";
  let kept: KeptMail[] = [];

  const smtp = new SMTPServer({
    // Loopback only: no TLS to offer, and any credentials a production-like config sends are accepted.
    disabledCommands: ["STARTTLS"],
    authOptional: true,
    allowInsecureAuth: true,
    onAuth: (auth, _session, callback) => callback(null, { user: auth.username ?? "anyone" }),
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          const kept1: KeptMail = {
            id: randomBytes(8).toString("hex"),
            from: mail.from?.text ?? envelopeFrom,
            // The envelope, not the To: header, says who really gets it (Bcc included).
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: mail.subject ?? "",
            text: mail.text ?? "",
            html: typeof mail.html === "string" ? mail.html : null,
            receivedAt: new Date().toISOString(),
          };
          kept.push(kept1);
          log("kept mail %s for %d recipient(s)", kept1.id, kept1.to.length);
          callback();
        })
        .catch((error: unknown) => {
          log("could not parse mail: %s", error instanceof Error ? error.message : String(error));
          callback(error instanceof Error ? error : new Error(String(error)));
        });
    },
  });
  smtp.on("error", (error) => log("smtp error: %s", error.message));

  const http = createServer((req: IncomingMessage, res: ServerResponse) => {
    const url = new URL(req.url ?? "/", "http://mailbox");
    if (url.pathname === "/messages" && req.method === "GET") {
      res.writeHead(200, { "content-type": "application/json" });
      res.end(JSON.stringify(kept));
    } else if (url.pathname === "/messages" && req.method === "DELETE") {
      kept = [];
      res.writeHead(204).end();
    } else if (url.pathname === "/" && req.method === "GET") {
      res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
      res.end(page(kept));
    } else {
      res.writeHead(404, { "content-type": "text/plain" }).end("not found");
    }
  });

  await new Promise<void>((resolve, reject) => {
    smtp.server.once("error", reject);
    smtp.listen(options.smtpPort ?? 0, host, () => resolve());
  });
  await new Promise<void>((resolve, reject) => {
    http.once("error", reject);
    http.listen(options.httpPort ?? 0, host, () => resolve());
  });
  const smtpPort = (smtp.server.address() as AddressInfo).port;
  const httpUrl = `http://${host}:${(http.address() as AddressInfo).port}`;
  log("smtp on %s:%d, web on %s", host, smtpPort, httpUrl);

  return {
    smtpPort,
    httpUrl,
    messages: () => kept.slice(),
    clear: () => {
      kept = [];
    },
    close: async () => {
      await new Promise<void>((resolve) => smtp.close(() => resolve()));
      await new Promise<void>((resolve, reject) => {
        http.close((error) => (error ? reject(error) : resolve()));
        http.closeAllConnections();
      });
      log("closed");
    },
  };
}

function cliOption(name: string): string | undefined {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? process.argv[at + 1] : undefined;
}

// CLI: tsx fakes/mailbox.ts --smtp-port 2525 --http-port 8025
if (process.argv[1] && import.meta.url === pathToFileURL(realpathSync(process.argv[1])).href) {
  const mailbox = await startMailbox({
    smtpPort: Number(cliOption("smtp-port") ?? 0),
    httpPort: Number(cliOption("http-port") ?? 0),
  });
  console.log(`mailbox: smtp 127.0.0.1:${mailbox.smtpPort}, read mail at ${mailbox.httpUrl}`);
  const stop = () => void mailbox.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
