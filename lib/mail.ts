import nodemailer, { type Transporter } from "nodemailer";
import { z } from "zod";

// Outgoing mail (invitations, password resets, push failure notices). Locally it
// goes to the SMTP sink (mocks/smtp-sink.ts); in production to a relay given by env.

export const DEFAULT_MAIL_FROM = "Zonewright <no-reply@zonewright.test>";

// Read here until lib/env.ts takes over; empty strings count as unset.
const mailEnvSchema = z
  .object({
    SMTP_HOST: z.string().min(1).default("127.0.0.1"),
    SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
    SMTP_USER: z.string().min(1).optional(),
    SMTP_PASS: z.string().min(1).optional(),
    /** "true" for implicit TLS (usually port 465); otherwise STARTTLS when the server offers it. */
    SMTP_SECURE: z.enum(["true", "false"]).default("false"),
    MAIL_FROM: z.string().min(3).default(DEFAULT_MAIL_FROM),
  })
  .refine((env) => (env.SMTP_USER === undefined) === (env.SMTP_PASS === undefined), {
    message: "SMTP_USER and SMTP_PASS must be set together",
    path: ["SMTP_PASS"],
  });

export interface MailConfig {
  host: string;
  port: number;
  user: string | null;
  pass: string | null;
  secure: boolean;
  from: string;
}

export function readMailConfig(env: Record<string, string | undefined> = process.env): MailConfig {
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = mailEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid mail environment:\n${z.prettifyError(parsed.error)}`);
  const e = parsed.data;
  return {
    host: e.SMTP_HOST,
    port: e.SMTP_PORT,
    user: e.SMTP_USER ?? null,
    pass: e.SMTP_PASS ?? null,
    secure: e.SMTP_SECURE === "true",
    from: e.MAIL_FROM,
  };
}

const LOCAL_HOSTS = new Set(["127.0.0.1", "localhost", "::1"]);

export function createMailTransport(config: MailConfig): Transporter {
  const local = LOCAL_HOSTS.has(config.host);
  return nodemailer.createTransport({
    host: config.host,
    port: config.port,
    secure: config.secure,
    // The local sink speaks plain SMTP; anywhere else refuse to send (or log in) in clear text.
    ignoreTLS: local && !config.secure,
    requireTLS: !local && !config.secure,
    auth: config.user && config.pass ? { user: config.user, pass: config.pass } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
}

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

export interface SentMail {
  messageId: string;
  accepted: string[];
  rejected: string[];
}

// One transport per configuration: a changed env (tests) gets a fresh one.
let cached: { key: string; transport: Transporter } | null = null;

function transportFor(config: MailConfig): Transporter {
  const key = JSON.stringify(config);
  if (cached?.key !== key) {
    cached?.transport.close();
    cached = { key, transport: createMailTransport(config) };
  }
  return cached.transport;
}

function addresses(list: unknown): string[] {
  if (!Array.isArray(list)) return [];
  return list.map((a) => (typeof a === "string" ? a : (a as { address?: string }).address ?? String(a)));
}

export async function sendMail(mail: OutgoingMail, config: MailConfig = readMailConfig()): Promise<SentMail> {
  const info = await transportFor(config).sendMail({
    from: config.from,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
  });
  return { messageId: String(info.messageId), accepted: addresses(info.accepted), rejected: addresses(info.rejected) };
}
