import { existsSync, readFileSync } from "node:fs";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import { DEFAULT_MAIL_FROM, readMailConfig, sendMail } from "@/lib/mail";
import { startSmtpSink, type RunningSmtpSink, type SinkMessage } from "@/mocks/smtp-sink";

let dir: string;
let sink: RunningSmtpSink;

beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "zonewright-mail-"));
  sink = await startSmtpSink({ port: 0, httpPort: 0, dir });
});
afterEach(() => vi.unstubAllEnvs());
afterAll(async () => {
  await sink?.close();
  await rm(dir, { recursive: true, force: true });
});

describe("lib/mail → SMTP sink", () => {
  it("delivers a real message through nodemailer and stores it as .eml", async () => {
    const config = readMailConfig({ SMTP_PORT: String(sink.smtpPort) });
    const sent = await sendMail(
      {
        to: "integrator@lindqvist-av.test",
        subject: "Push finished: Lindqvist residence",
        text: "4 of 4 zones applied.\nFamily room drifted and was corrected.",
        html: "<p>4 of 4 zones applied.</p>",
      },
      config,
    );
    expect(sent.accepted).toEqual(["integrator@lindqvist-av.test"]);

    const message = await sink.waitForMessage((m) => m.subject === "Push finished: Lindqvist residence");
    expect(message.to).toEqual(["integrator@lindqvist-av.test"]);
    expect(message.from).toBe(`"Zonewright" <no-reply@zonewright.test>`);
    expect(message.text?.trim()).toBe("4 of 4 zones applied.\nFamily room drifted and was corrected.");
    expect(message.html).toContain("<p>4 of 4 zones applied.</p>");
    expect(message.messageId).toBe(sent.messageId);

    expect(path.dirname(message.file)).toBe(dir);
    expect(existsSync(message.file)).toBe(true);
    const eml = readFileSync(message.file, "utf8");
    expect(eml).toContain("Subject: Push finished: Lindqvist residence");
    expect(eml).toContain("To: integrator@lindqvist-av.test");
  });

  it("reads SMTP settings from the environment when none are passed", async () => {
    vi.stubEnv("SMTP_HOST", "127.0.0.1");
    vi.stubEnv("SMTP_PORT", String(sink.smtpPort));
    vi.stubEnv("MAIL_FROM", "Zonewright Support <support@zonewright.test>");
    await sendMail({ to: ["a@home.test", "b@home.test"], subject: "Guest controls locked", text: "Locked by support." });
    const message = await sink.waitForMessage((m) => m.subject === "Guest controls locked");
    expect(message.to).toEqual(["a@home.test", "b@home.test"]);
    expect(message.from).toBe(`"Zonewright Support" <support@zonewright.test>`);
    expect(message.html).toBeNull();
  });

  it("serves the mailbox as JSON over HTTP, newest first, filterable by recipient", async () => {
    const config = readMailConfig({ SMTP_PORT: String(sink.smtpPort) });
    await sendMail({ to: "owner@tidewater.test", subject: "Invitation to Zonewright", text: "Join your team." }, config);
    await sink.waitForMessage((m) => m.subject === "Invitation to Zonewright");

    const all = (await (await fetch(`${sink.httpUrl}/messages`)).json()) as { messages: SinkMessage[] };
    expect(all.messages[0].subject).toBe("Invitation to Zonewright");
    expect(all.messages.length).toBe(sink.messages().length);

    const mine = (await (await fetch(`${sink.httpUrl}/messages?to=OWNER@tidewater.test`)).json()) as { messages: SinkMessage[] };
    expect(mine.messages.map((m) => m.subject)).toEqual(["Invitation to Zonewright"]);

    const one = await fetch(`${sink.httpUrl}/messages/${mine.messages[0].id}`);
    expect(((await one.json()) as SinkMessage).text?.trim()).toBe("Join your team.");
    const raw = await fetch(`${sink.httpUrl}/messages/${mine.messages[0].id}/raw`);
    expect(raw.headers.get("content-type")).toBe("message/rfc822");
    expect(await raw.text()).toContain("Subject: Invitation to Zonewright");
    expect((await fetch(`${sink.httpUrl}/messages/nope`)).status).toBe(404);
  });

  it("loads earlier .eml files when it starts again on the same folder", async () => {
    const second = await startSmtpSink({ port: 0, httpPort: 0, dir });
    try {
      expect(second.messages().map((m) => m.subject)).toEqual(expect.arrayContaining(sink.messages().map((m) => m.subject)));
      await second.waitForMessage((m) => m.subject === "Guest controls locked", 100);
    } finally {
      await second.close();
    }
  });

  it("skips an empty (cut short) file in the folder", async () => {
    await writeFile(path.join(dir, "0000-broken.eml"), "");
    const third = await startSmtpSink({ port: 0, httpPort: 0, dir });
    try {
      expect(third.messages()).toHaveLength(sink.messages().length);
      expect(third.messages().some((m) => m.file.endsWith("0000-broken.eml"))).toBe(false);
    } finally {
      await third.close();
    }
  });
});

describe("readMailConfig", () => {
  it("defaults to the local sink", () => {
    expect(readMailConfig({})).toEqual({ host: "127.0.0.1", port: 2525, user: null, pass: null, secure: false, from: DEFAULT_MAIL_FROM });
    expect(DEFAULT_MAIL_FROM).toBe("Zonewright <no-reply@zonewright.test>");
  });

  it("rejects a user without a password and a bad port", () => {
    expect(() => readMailConfig({ SMTP_USER: "relay" })).toThrow(/SMTP_USER and SMTP_PASS/);
    expect(() => readMailConfig({ SMTP_PORT: "seventy" })).toThrow(/SMTP_PORT/);
  });
});
