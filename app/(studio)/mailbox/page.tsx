import { notFound } from "next/navigation";
import { z } from "zod";
import { EmptyState } from "@/components/ui/empty-state";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { env } from "@/lib/env";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

// Development only: the e-mail the app sent (push summaries, invitations), as
// captured by the local SMTP sink that `npm start` runs. Each is also saved as
// an .eml file in .data/mail. Production sends through the SMTP relay in the
// environment and has no such page.

export const metadata = { title: "Mailbox (development)" };
export const dynamic = "force-dynamic";

const messageSchema = z.object({
  id: z.string(),
  subject: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  text: z.string().nullable(),
  date: z.string(),
  file: z.string(),
});

function sinkUrl() {
  const port = Number(process.env.SMTP_SINK_HTTP_PORT ?? 2526);
  return `http://127.0.0.1:${Number.isInteger(port) ? port : 2526}`;
}

function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((part, i) =>
        /^https?:\/\//.test(part) ? (
          <a key={i} href={part} className="text-accent-700 underline">
            {part}
          </a>
        ) : (
          <span key={i}>{part}</span>
        ),
      )}
    </>
  );
}

export default async function MailboxPage() {
  if (env().ZW_ENV === "production") notFound();
  const actor = await requirePageActor("/mailbox");
  if (!can(actor, "mailbox:read")) return <ForbiddenNotice />;
  let messages: z.infer<typeof messageSchema>[] = [];
  let problem: string | null = null;
  try {
    const response = await fetch(`${sinkUrl()}/messages`, { cache: "no-store", signal: AbortSignal.timeout(3000) });
    if (!response.ok) throw new Error(`the sink answered ${response.status}`);
    messages = z.object({ messages: z.array(messageSchema) }).parse(await response.json()).messages;
  } catch (error) {
    problem = error instanceof Error ? error.message : String(error);
  }
  return (
    <div>
      <h1 className="text-2xl font-semibold">Mailbox</h1>
      <p className="text-sm text-slate-600">
        Development only: every e-mail the app sent, caught by the local mail sink (also saved as .eml files in <code>.data/mail</code>). Nothing here
        left this machine.
      </p>
      {problem ? (
        <p role="alert" className="mt-4 rounded-lg bg-danger-50 p-4 text-sm text-danger-700">
          The local mail sink did not answer ({problem}). It runs with <code>npm start</code>.
        </p>
      ) : messages.length === 0 ? (
        <div className="mt-4">
          <EmptyState title="No e-mail yet.">Push summaries (when something failed) and invitations appear here.</EmptyState>
        </div>
      ) : (
        <ul className="mt-4 space-y-2" data-testid="mailbox">
          {messages.map((m) => (
            <li key={m.id} className="rounded-lg border border-slate-200 bg-white shadow-sm">
              <details>
                <summary className="cursor-pointer px-4 py-3">
                  <span className="font-medium">{m.subject || "(no subject)"}</span>
                  <span className="ml-2 text-sm text-slate-500">
                    to {m.to.join(", ")} · {new Date(m.date).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" })}
                  </span>
                </summary>
                <div className="border-t border-slate-100 px-4 py-3">
                  <p className="text-xs text-slate-500">From {m.from} · saved as {m.file}</p>
                  <pre className="mt-2 whitespace-pre-wrap font-sans text-sm">
                    <Linkified text={m.text ?? "(no plain-text part)"} />
                  </pre>
                </div>
              </details>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
