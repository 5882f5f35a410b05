"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import useSWR from "swr";
import { DialogShell, FieldError, FormError, inputClass, labelClass } from "@/components/board/dialog-shell";
import type { CurveChoiceDto, TemplateDetailDto } from "@/db/queries/templates";
import { useHydrated } from "@/components/ui/use-hydrated";
import { sendJson, type ApiError } from "@/lib/fetcher";
import { ApplyTemplateDialog } from "./apply-template-dialog";
import { DeleteTemplateDialog } from "./delete-template-dialog";
import { DuplicateTemplateDialog } from "./duplicate-template-dialog";
import { TemplateConfigEditor } from "./template-config-editor";
import { TemplateConfigView } from "./template-config-view";
import type { TemplateRights } from "./template-library";
import { TemplateUpdatePanel } from "./template-update-panel";
import { TemplateZones } from "./template-zones";
import { Badge, buttonClass, dangerButtonClass, errorText, fieldErrorsOf, Notice, primaryButtonClass } from "./ui";

function RenameDialog({ template, onClose, onSaved }: { template: TemplateDetailDto; onClose: () => void; onSaved: (t: TemplateDetailDto) => void }) {
  const [name, setName] = useState(template.name);
  const [description, setDescription] = useState(template.description);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    try {
      onSaved(await sendJson<TemplateDetailDto>(`/api/templates/${template.id}`, "PATCH", { version: template.version, name, description }));
    } catch (e) {
      setError(errorText(e));
      setFieldErrors(fieldErrorsOf(e));
      setBusy(false);
    }
  }
  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title="Name and description"
      description="Renaming does not change the version: zones made from it stay up to date." testId="rename-template-dialog">
      <form onSubmit={submit} noValidate className="space-y-3">
        <FormError message={error} />
        <div>
          <label htmlFor="rename-name" className={labelClass}>Name</label>
          <input id="rename-name" className={inputClass} value={name} onChange={(e) => setName(e.target.value)}
            aria-invalid={Boolean(fieldErrors.name)} aria-describedby="rename-name-error" />
          <FieldError id="rename-name-error" messages={fieldErrors.name} />
        </div>
        <div>
          <label htmlFor="rename-description" className={labelClass}>Description</label>
          <textarea id="rename-description" rows={3} className={inputClass} value={description} onChange={(e) => setDescription(e.target.value)} />
          <FieldError id="rename-description-error" messages={fieldErrors.description} />
        </div>
        <div className="flex justify-end gap-2">
          <button type="button" className={buttonClass} onClick={onClose}>Cancel</button>
          <button type="submit" className={primaryButtonClass} disabled={busy}>{busy ? "Saving…" : "Save"}</button>
        </div>
      </form>
    </DialogShell>
  );
}

type Open = "rename" | "apply" | "duplicate" | "delete" | null;

export function TemplateDetail({ templateId, rights, curves }: { templateId: string; rights: TemplateRights; curves: CurveChoiceDto[] }) {
  const router = useRouter();
  const hydrated = useHydrated();
  const key = `/api/templates/${templateId}`;
  const { data: template, error, mutate } = useSWR<TemplateDetailDto, ApiError>(key);
  const [open, setOpen] = useState<Open>(null);
  const [editing, setEditing] = useState(false);
  const [saved, setSaved] = useState<string | null>(null);

  if (error) {
    return (
      <Notice tone="error">
        The template could not be loaded: {error.message}{" "}
        <button type="button" className="underline" onClick={() => mutate()}>Retry</button>
      </Notice>
    );
  }
  if (!template) return <p role="status">Loading…</p>;

  return (
    <div className="space-y-6" data-testid="template-detail" data-hydrated={hydrated}>
      <nav className="text-sm text-slate-500" aria-label="Breadcrumb">
        <Link href="/library/templates" className="hover:underline">Zone templates</Link> / {template.name}
      </nav>
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold" data-testid="template-name">{template.name}</h1>
          {template.description ? <p className="mt-1 max-w-2xl text-sm text-slate-600">{template.description}</p> : null}
          <p className="mt-1 flex flex-wrap items-center gap-1 text-sm text-slate-500">
            <Badge>version {template.version}</Badge>
            <Badge tone="accent">{template.zoneCount} zone{template.zoneCount === 1 ? "" : "s"}</Badge>
            {template.behindCount > 0 ? <Badge tone="caution">{template.behindCount} behind</Badge> : null}
            <span>
              {template.createdBy ? `Made by ${template.createdBy}` : ""} · changed{" "}
              <time dateTime={template.updatedAt}>{new Date(template.updatedAt).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" })}</time>
            </span>
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          {rights.canApply ? <button type="button" className={primaryButtonClass} onClick={() => setOpen("apply")}>Use in a home</button> : null}
          {rights.canDuplicate ? <button type="button" className={buttonClass} onClick={() => setOpen("duplicate")}>Duplicate</button> : null}
          {rights.canEdit ? <button type="button" className={buttonClass} onClick={() => setOpen("rename")}>Rename or describe</button> : null}
          {rights.canEdit && !editing ? <button type="button" className={buttonClass} onClick={() => setEditing(true)}>Edit configuration</button> : null}
          {rights.canEdit ? (
            <button type="button" className={dangerButtonClass} disabled={template.zoneCount > 0} onClick={() => setOpen("delete")}
              title={template.zoneCount > 0 ? "Zones still use it; it can be deleted once no zone uses it." : undefined}>
              Delete
            </button>
          ) : null}
        </div>
      </header>

      {saved ? <Notice tone="ok" testId="template-saved">{saved}</Notice> : null}

      <section aria-labelledby="config-heading" className="space-y-2">
        <h2 id="config-heading" className="text-lg font-semibold">Configuration</h2>
        {editing ? (
          <TemplateConfigEditor
            template={template}
            curves={curves}
            onCancel={() => setEditing(false)}
            onSaved={(t) => {
              setEditing(false);
              setSaved(
                t.version > template.version
                  ? `Saved as version ${t.version}. ${t.behindCount} zone${t.behindCount === 1 ? " is" : "s are"} now behind; update them below.`
                  : "Nothing in the configuration changed.",
              );
              void mutate(t, { revalidate: false });
            }}
          />
        ) : (
          <TemplateConfigView config={template.config} />
        )}
      </section>

      <section aria-labelledby="zones-heading" className="space-y-2">
        <h2 id="zones-heading" className="text-lg font-semibold">Zones made from this template</h2>
        <TemplateZones template={template} onChanged={() => mutate()} />
      </section>

      {template.zoneCount > 0 && (rights.canApply || rights.canEdit) ? (
        <section id="update" aria-labelledby="update-heading" className="space-y-2">
          <h2 id="update-heading" className="text-lg font-semibold">Update zones to version {template.version}</h2>
          <p className="text-sm text-slate-600">
            Each chosen zone gets the template’s current values, except the fields it sets itself. Every updated zone gets a new revision, ready to push.
          </p>
          <TemplateUpdatePanel templateId={template.id} templateVersion={template.version} canPush={rights.canPush} onUpdated={() => mutate()} />
        </section>
      ) : null}

      {open === "rename" ? (
        <RenameDialog template={template} onClose={() => setOpen(null)} onSaved={(t) => { setOpen(null); void mutate(t, { revalidate: false }); }} />
      ) : null}
      {open === "apply" ? <ApplyTemplateDialog template={template} onClose={() => setOpen(null)} onDone={() => mutate()} /> : null}
      {open === "duplicate" ? (
        <DuplicateTemplateDialog template={template} onClose={() => setOpen(null)} onDone={(id) => router.push(`/library/templates/${id}`)} />
      ) : null}
      {open === "delete" ? (
        <DeleteTemplateDialog template={template} onClose={() => setOpen(null)} onDone={() => router.replace("/library/templates")} />
      ) : null}
    </div>
  );
}
