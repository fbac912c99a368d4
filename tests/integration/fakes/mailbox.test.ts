import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startMailbox, type KeptMail, type Mailbox } from "@/fakes/mailbox";
import { makeMailer, type Mailer } from "@/lib/server/mail/mail";

let mailbox: Mailbox;
let mailer: Mailer;

beforeAll(async () => {
  mailbox = await startMailbox();
  mailer = makeMailer({ host: "127.0.0.1", port: mailbox.smtpPort, from: "Wormward <alerts@wormward.test>" });
});

afterAll(async () => {
  mailer.close();
  await mailbox.close();
});

describe("mailbox with lib/server/mail/mail.ts", () => {
  it("keeps a sent mail with its sender, recipients, subject, text and html", async () => {
    mailbox.clear();
    const { messageId } = await mailer.send({
      to: ["keeper@example.org", "owner@example.org"],
      subject: "Bin 2, fresh zone: heat — act now",
      text: "31.5 °C and rising 2.1 °C/h since the feeding at 06:10.",
      html: "<p><strong>31.5 °C</strong> and rising</p>",
    });
    expect(messageId).toMatch(/@/);

    const [mail, ...rest] = mailbox.messages();
    expect(rest).toHaveLength(0);
    expect(mail).toMatchObject({
      from: '"Wormward" <alerts@wormward.test>',
      to: ["keeper@example.org", "owner@example.org"],
      subject: "Bin 2, fresh zone: heat — act now",
      html: "<p><strong>31.5 °C</strong> and rising</p>",
    });
    expect(mail?.text.trim()).toBe("31.5 °C and rising 2.1 °C/h since the feeding at 06:10.");
    expect(Date.parse(mail?.receivedAt ?? "")).toBeGreaterThan(Date.now() - 60_000);
  });

  it("lists kept mail over GET /messages and shows it, escaped, on the HTML page", async () => {
    mailbox.clear();
    await mailer.send({ to: "keeper@example.org", subject: "Digest <week 12>", text: "3 feedings, 1 harvest" });

    const listed = (await (await fetch(`${mailbox.httpUrl}/messages`)).json()) as KeptMail[];
    expect(listed.map((m) => [m.subject, m.html])).toEqual([["Digest <week 12>", null]]);

    const page = await fetch(`${mailbox.httpUrl}/`);
    expect(page.headers.get("content-type")).toMatch(/text\/html/);
    const html = await page.text();
    expect(html).toContain("Digest &lt;week 12&gt;");
    expect(html).not.toContain("Digest <week 12>");

    expect((await fetch(`${mailbox.httpUrl}/messages`, { method: "DELETE" })).status).toBe(204);
    expect(mailbox.messages()).toEqual([]);
  });
});
