"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import useSWR from "swr";
import type { CurveDetailDto, CurveSummaryDto } from "@/db/queries/curves";
import { ApiError, sendJson } from "@/lib/fetcher";
import { CURVE_IMPORT_MAX_BYTES, curvesUrl } from "@/lib/validation/curves";
import { CurveActions } from "./curve-actions";
import { ErrorNotice, LARGE_BOOST_DB } from "./cautions";
import { AudioDialog } from "./dialog";
import { formatDb } from "./units";

// The tone-curve library: every curve with its bands, largest boost and where
// it is used; create, import, duplicate, delete (when unused), export.

export function CurveLibrary({ canEdit }: { canEdit: boolean }) {
  const { data, error, isLoading, mutate } = useSWR<{ items: CurveSummaryDto[] }, ApiError>(curvesUrl);
  const [creating, setCreating] = useState(false);
  const [importing, setImporting] = useState(false);
  const router = useRouter();

  return (
    <section className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">Tone curves</h1>
          <p className="text-sm text-slate-600">Parametric EQ curves your team attaches to zones, sources and stream presets.</p>
        </div>
        {canEdit ? (
          <div className="flex gap-2">
            <button type="button" onClick={() => setImporting(true)} className="rounded-md px-3 py-1.5 text-sm font-medium ring-1 ring-slate-300 hover:bg-slate-50">
              Import JSON or CSV
            </button>
            <button type="button" onClick={() => setCreating(true)} className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700">
              New curve
            </button>
          </div>
        ) : null}
      </div>

      {error ? (
        <ErrorNotice testId="curves-error" onRetry={() => mutate()}>
          Tone curves could not be loaded: {error.message}
        </ErrorNotice>
      ) : null}

      {isLoading && !data ? (
        <p role="status" className="text-slate-500">Loading tone curves…</p>
      ) : data && data.items.length === 0 ? (
        <div className="rounded-lg border border-dashed border-slate-300 bg-white px-6 py-10 text-center">
          <p className="font-medium">No tone curves yet.</p>
          <p className="mt-1 text-sm text-slate-600">{canEdit ? "Create one, or import a JSON or CSV file exported from another library." : "Your integrators create them."}</p>
        </div>
      ) : data ? (
        <ul className="divide-y divide-slate-100 rounded-lg border border-slate-200 bg-white" data-testid="curve-list">
          {data.items.map((c) => (
            <li key={c.id} data-testid="curve-row" className="flex flex-wrap items-start justify-between gap-3 px-4 py-3">
              <div className="min-w-0">
                <Link href={`/library/curves/${c.id}`} className="font-medium text-accent-700 hover:underline">
                  {c.name}
                </Link>
                {c.description ? <p className="text-sm text-slate-600">{c.description}</p> : null}
                <p className="mt-0.5 text-sm text-slate-500">
                  {c.bandCount} band{c.bandCount === 1 ? "" : "s"} · largest boost{" "}
                  <span className={c.largestBoostDb > LARGE_BOOST_DB ? "font-medium text-caution-700" : undefined}>{formatDb(c.largestBoostDb)}</span> ·{" "}
                  {c.attachedCount === 0 ? "not attached" : `attached ${c.attachedCount}×`}
                </p>
                {c.misfitZoneCount > 0 ? (
                  <p className="mt-1 text-sm text-danger-700" role="note" data-testid="curve-misfit">
                    {c.misfitZoneCount} zone{c.misfitZoneCount === 1 ? "" : "s"} using it {c.misfitZoneCount === 1 ? "has" : "have"} a device with fewer EQ bands than {c.misfitZoneCount === 1 ? "its" : "their"} curves need. Open the curve to see which.
                  </p>
                ) : null}
              </div>
              <CurveActions curve={c} canEdit={canEdit} onDuplicated={(id) => router.push(`/library/curves/${id}`)} />
            </li>
          ))}
        </ul>
      ) : null}

      <NewCurveDialog open={creating} onOpenChange={setCreating} onCreated={(id) => router.push(`/library/curves/${id}`)} />
      <ImportCurveDialog open={importing} onOpenChange={setImporting} onImported={(id) => router.push(`/library/curves/${id}`)} />
    </section>
  );
}

function NewCurveDialog({ open, onOpenChange, onCreated }: { open: boolean; onOpenChange: (o: boolean) => void; onCreated: (id: string) => void }) {
  const [name, setName] = useState("");
  const [description, setDescription] = useState("");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setMessage(null);
    try {
      const curve = await sendJson<CurveDetailDto>(curvesUrl, "POST", { name, description, bands: [] });
      onOpenChange(false);
      setName("");
      setDescription("");
      onCreated(curve.id);
    } catch (err) {
      if (err instanceof ApiError) {
        setErrors(err.fieldErrors ?? {});
        setMessage(err.message);
      } else setMessage("The curve could not be created.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <AudioDialog open={open} onOpenChange={onOpenChange} title="New tone curve" description="Start flat; add bands in the editor." testId="new-curve-dialog">
      <form onSubmit={submit} className="space-y-3">
        <div>
          <label htmlFor="new-curve-name" className="block text-sm font-medium">Name</label>
          <input id="new-curve-name" required value={name} onChange={(e) => setName(e.target.value)} className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm" />
          {errors.name ? <p className="mt-1 text-xs text-danger-700">{errors.name.join(" ")}</p> : null}
        </div>
        <div>
          <label htmlFor="new-curve-description" className="block text-sm font-medium">Description (optional)</label>
          <input id="new-curve-description" value={description} onChange={(e) => setDescription(e.target.value)} className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm" />
        </div>
        {message && !errors.name ? <p role="alert" className="text-sm text-danger-700">{message}</p> : null}
        <div className="flex justify-end gap-2">
          <button type="button" onClick={() => onOpenChange(false)} className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300">Cancel</button>
          <button type="submit" disabled={busy} className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white disabled:opacity-40">
            {busy ? "Creating…" : "Create and edit"}
          </button>
        </div>
      </form>
    </AudioDialog>
  );
}

/** The file name without extension, tidied into a curve name. */
function nameFromFile(fileName: string) {
  return fileName.replace(/\.(json|csv)$/i, "").replace(/[-_]+/g, " ").trim().slice(0, 80);
}

export function ImportCurveDialog({ open, onOpenChange, onImported }: { open: boolean; onOpenChange: (o: boolean) => void; onImported: (id: string) => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [name, setName] = useState("");
  const [description, setDescription] = useState("");
  const [problems, setProblems] = useState<string[]>([]);
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  function reset() {
    setFile(null);
    setName("");
    setDescription("");
    setProblems([]);
    setMessage(null);
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setProblems([]);
    setMessage(null);
    if (!file) {
      setMessage("Choose a .json or .csv file.");
      return;
    }
    if (file.size > CURVE_IMPORT_MAX_BYTES) {
      setMessage(`The file is ${Math.round(file.size / 1024)} KB; the limit is ${CURVE_IMPORT_MAX_BYTES / 1024} KB.`);
      return;
    }
    setBusy(true);
    try {
      const form = new FormData();
      form.set("file", file);
      form.set("name", name);
      form.set("description", description);
      const response = await fetch(`${curvesUrl}/import`, { method: "POST", body: form, headers: { accept: "application/json" } });
      const body = (await response.json().catch(() => null)) as (CurveDetailDto & { error?: undefined }) | { error: { message: string; fieldErrors?: Record<string, string[]> } } | null;
      if (!response.ok || !body || body.error) {
        const err = body?.error;
        setProblems(err?.fieldErrors?.file ?? []);
        setMessage(err?.fieldErrors?.name ? `Name: ${err.fieldErrors.name.join(" ")}` : err?.fieldErrors?.file ? `${file.name} could not be imported. Nothing was saved.` : (err?.message ?? `The import failed (${response.status}).`));
        return;
      }
      onOpenChange(false);
      reset();
      onImported((body as CurveDetailDto).id);
    } catch {
      setMessage("The file could not be sent. Check the connection and try again.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <AudioDialog
      open={open}
      onOpenChange={(o) => {
        onOpenChange(o);
        if (!o) reset();
      }}
      title="Import a tone curve"
      description="Our JSON format ({ &quot;bands&quot;: [...] }) or CSV with the header type,frequency_hz,gain_db,q (and optionally enabled) — the formats Export writes."
      testId="import-curve-dialog"
    >
      <form onSubmit={submit} className="space-y-3">
        <div>
          <label htmlFor="import-file" className="block text-sm font-medium">File (.json or .csv)</label>
          <input
            id="import-file"
            type="file"
            accept=".json,.csv,application/json,text/csv"
            onChange={(e) => {
              const f = e.target.files?.[0] ?? null;
              setFile(f);
              if (f && !name) setName(nameFromFile(f.name));
              setProblems([]);
              setMessage(null);
            }}
            className="mt-1 block w-full text-sm"
          />
        </div>
        <div>
          <label htmlFor="import-name" className="block text-sm font-medium">Name</label>
          <input id="import-name" required value={name} onChange={(e) => setName(e.target.value)} className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm" />
        </div>
        <div>
          <label htmlFor="import-description" className="block text-sm font-medium">Description (optional)</label>
          <input id="import-description" value={description} onChange={(e) => setDescription(e.target.value)} className="mt-1 w-full rounded-md border border-slate-300 px-3 py-1.5 text-sm" />
        </div>
        {message ? (
          <div role="alert" data-testid="import-errors" className="rounded-md border border-danger-600/30 bg-danger-50 px-3 py-2 text-sm text-danger-700">
            <p>{message}</p>
            {problems.length ? (
              <ul className="mt-1 list-disc pl-5">
                {problems.slice(0, 20).map((p) => (
                  <li key={p}>{p}</li>
                ))}
                {problems.length > 20 ? <li>…and {problems.length - 20} more</li> : null}
              </ul>
            ) : null}
          </div>
        ) : null}
        <div className="flex justify-end gap-2">
          <button type="button" onClick={() => onOpenChange(false)} className="rounded-md px-3 py-1.5 text-sm ring-1 ring-slate-300">Cancel</button>
          <button type="submit" disabled={busy} className="rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white disabled:opacity-40">
            {busy ? "Importing…" : "Import"}
          </button>
        </div>
      </form>
    </AudioDialog>
  );
}
