import { randomUUID } from "node:crypto";
import { mkdir, readdir, readFile, writeFile } from "node:fs/promises";
import { createServer as createHttpServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { simpleParser, type AddressObject, type ParsedMail } from "mailparser";
import { SMTPServer } from "smtp-server";
import { z } from "zod";

// Local SMTP sink for development and tests: accepts every message, stores it as
// .eml in a folder and keeps a parsed list in memory, served as JSON over HTTP for
// the dev mailbox page and Playwright:
//   GET    /messages[?to=address]   newest first (text and html included)
//   GET    /messages/:id            one message
//   GET    /messages/:id/raw        the .eml as received
//   DELETE /messages                forget all (files stay on disk)

const sinkEnvSchema = z.object({
  SMTP_SINK_PORT: z.coerce.number().int().min(0).max(65535).default(2525),
  SMTP_SINK_HTTP_PORT: z.coerce.number().int().min(0).max(65535).default(2526),
  SMTP_SINK_DIR: z.string().min(1).default(".data/mail"),
});

function readSinkEnv(env: Record<string, string | undefined> = process.env) {
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = sinkEnvSchema.safeParse(present);
  if (!parsed.success) throw new Error(`Invalid SMTP sink environment:\n${z.prettifyError(parsed.error)}`);
  return parsed.data;
}

export interface SinkMessage {
  id: string;
  messageId: string | null;
  subject: string;
  from: string;
  /** Envelope recipients (Bcc included); header recipients for files loaded from disk. */
  to: string[];
  text: string | null;
  html: string | null;
  date: string;
  file: string;
}

export interface StartSmtpSinkOptions {
  /** 0 picks a free port. Defaults to SMTP_SINK_PORT or 2525. */
  port?: number;
  /** 0 picks a free port. Defaults to SMTP_SINK_HTTP_PORT or 2526. */
  httpPort?: number;
  host?: string;
  /** Defaults to SMTP_SINK_DIR or .data/mail (relative to the working directory). */
  dir?: string;
  /** Read .eml files already in dir, so a restarted sink still shows earlier mail. */
  loadExisting?: boolean;
}

export interface RunningSmtpSink {
  host: string;
  smtpPort: number;
  httpPort: number;
  httpUrl: string;
  dir: string;
  messages(): SinkMessage[];
  waitForMessage(predicate: (m: SinkMessage) => boolean, timeoutMs?: number): Promise<SinkMessage>;
  clear(): void;
  close(): Promise<void>;
}

function addressList(value: AddressObject | AddressObject[] | undefined): string[] {
  const objects = value === undefined ? [] : Array.isArray(value) ? value : [value];
  return objects.flatMap((o) => o.value.map((a) => a.address ?? "").filter(Boolean));
}

function toMessage(id: string, parsed: ParsedMail, file: string, envelopeTo: string[] | null): SinkMessage {
  return {
    id,
    messageId: parsed.messageId ?? null,
    subject: parsed.subject ?? "",
    from: parsed.from?.text ?? "",
    to: envelopeTo ?? addressList(parsed.to),
    text: parsed.text ?? null,
    html: typeof parsed.html === "string" ? parsed.html : null,
    date: (parsed.date ?? new Date()).toISOString(),
    file,
  };
}

export async function startSmtpSink(opts: StartSmtpSinkOptions = {}): Promise<RunningSmtpSink> {
  const env = readSinkEnv();
  const host = opts.host ?? "127.0.0.1";
  const dir = path.resolve(opts.dir ?? env.SMTP_SINK_DIR);
  await mkdir(dir, { recursive: true });

  let messages: SinkMessage[] = [];
  let waiters: { predicate: (m: SinkMessage) => boolean; resolve: (m: SinkMessage) => void }[] = [];

  function add(message: SinkMessage) {
    messages.push(message);
    const matched = waiters.filter((w) => w.predicate(message));
    waiters = waiters.filter((w) => !matched.includes(w));
    for (const w of matched) w.resolve(message);
  }

  if (opts.loadExisting ?? true) {
    const files = (await readdir(dir)).filter((f) => f.endsWith(".eml")).sort();
    for (const name of files) {
      const file = path.join(dir, name);
      try {
        const raw = await readFile(file);
        if (raw.length === 0) continue; // a write cut short
        messages.push(toMessage(name.replace(/\.eml$/, ""), await simpleParser(raw), file, null));
      } catch {
        // A half-written or foreign file is not worth failing the sink over.
      }
    }
  }

  const smtp = new SMTPServer({
    authOptional: true,
    // Plain SMTP only; accept any login a client sends, so a configured SMTP_USER still works locally.
    allowInsecureAuth: true,
    disabledCommands: ["STARTTLS"],
    closeTimeout: 1000,
    logger: false,
    size: 25 * 1024 * 1024,
    onAuth(_auth, _session, callback) {
      callback(null, { user: "sink" });
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (chunk: Buffer) => chunks.push(chunk));
      stream.on("error", (error) => callback(error));
      stream.on("end", () => {
        const raw = Buffer.concat(chunks);
        const id = `${Date.now()}-${randomUUID().slice(0, 8)}`;
        const file = path.join(dir, `${id}.eml`);
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        writeFile(file, raw)
          .then(() => simpleParser(raw))
          .then((parsed) => {
            add(toMessage(id, parsed, file, envelopeTo));
            callback();
          })
          .catch((error: Error) => callback(error));
      });
    },
  });

  // smtp-server re-emits socket errors; without a listener an EventEmitter error would crash the process.
  smtp.on("error", (error: Error) => console.error("[smtp sink]", error.message));

  const http: Server = createHttpServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://sink");
    const send = (status: number, body: unknown, type = "application/json") => {
      res.writeHead(status, { "content-type": type, "access-control-allow-origin": "*", "cache-control": "no-store" });
      res.end(typeof body === "string" ? body : JSON.stringify(body));
    };
    const parts = url.pathname.split("/").filter(Boolean);
    if (parts[0] !== "messages") return send(404, { error: "not_found" });
    if (req.method === "DELETE" && parts.length === 1) {
      messages = [];
      return send(200, { ok: true });
    }
    if (req.method !== "GET") return send(405, { error: "method_not_allowed" });
    if (parts.length === 1) {
      const to = url.searchParams.get("to")?.toLowerCase();
      const list = messages.filter((m) => !to || m.to.some((a) => a.toLowerCase() === to));
      return send(200, { messages: [...list].reverse() });
    }
    const message = messages.find((m) => m.id === parts[1]);
    if (!message) return send(404, { error: "not_found" });
    if (parts[2] === "raw") {
      readFile(message.file).then(
        (raw) => send(200, raw.toString("utf8"), "message/rfc822"),
        () => send(410, { error: "file_gone" }),
      );
      return;
    }
    return send(200, message);
  });

  const listen = (server: { listen: (port: number, host: string, cb: () => void) => unknown; once: (e: "error", l: (err: Error) => void) => unknown }, port: number) =>
    new Promise<void>((resolve, reject) => {
      server.once("error", reject);
      server.listen(port, host, () => resolve());
    });
  await listen(smtp.server, opts.port ?? env.SMTP_SINK_PORT);
  try {
    await listen(http, opts.httpPort ?? env.SMTP_SINK_HTTP_PORT);
  } catch (error) {
    await new Promise<void>((resolve) => smtp.close(() => resolve()));
    throw error;
  }
  const smtpPort = (smtp.server.address() as AddressInfo).port;
  const httpPort = (http.address() as AddressInfo).port;

  return {
    host,
    smtpPort,
    httpPort,
    httpUrl: `http://${host}:${httpPort}`,
    dir,
    messages: () => [...messages],
    waitForMessage(predicate, timeoutMs = 5000) {
      const existing = messages.find(predicate);
      if (existing) return Promise.resolve(existing);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => {
          waiters = waiters.filter((w) => w !== waiter);
          reject(new Error(`No matching message within ${timeoutMs} ms`));
        }, timeoutMs);
        const waiter = {
          predicate,
          resolve: (m: SinkMessage) => {
            clearTimeout(timer);
            resolve(m);
          },
        };
        waiters.push(waiter);
      });
    },
    clear() {
      messages = [];
    },
    close: () =>
      Promise.all([
        new Promise<void>((resolve) => smtp.close(() => resolve())),
        new Promise<void>((resolve, reject) => {
          http.close((err) => (err ? reject(err) : resolve()));
          http.closeAllConnections();
        }),
      ]).then(() => undefined),
  };
}

const isMain = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  startSmtpSink().then(
    (sink) => {
      console.log(`[smtp sink] smtp://${sink.host}:${sink.smtpPort}  mailbox ${sink.httpUrl}/messages  files ${sink.dir}`);
      const stop = () => {
        sink.close().then(
          () => process.exit(0),
          () => process.exit(1),
        );
      };
      process.once("SIGINT", stop);
      process.once("SIGTERM", stop);
    },
    (error: unknown) => {
      console.error("[smtp sink] could not start:", error);
      process.exit(1);
    },
  );
}
