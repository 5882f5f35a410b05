"use client";
import { useState } from "react";
import { DialogShell, FieldError, FormError, inputClass, labelClass } from "@/components/board/dialog-shell";
import type { TemplateSummaryDto } from "@/db/queries/templates";
import { sendJson } from "@/lib/fetcher";
import { buttonClass, errorText, fieldErrorsOf, primaryButtonClass } from "./ui";

/** A variant: the same configuration under a new name, at version 1, used by no zone yet. */
export function DuplicateTemplateDialog({
  template,
  onClose,
  onDone,
}: {
  template: Pick<TemplateSummaryDto, "id" | "name" | "description">;
  onClose: () => void;
  onDone: (id: string) => void;
}) {
  const [name, setName] = useState(`${template.name} (variant)`);
  const [description, setDescription] = useState(template.description);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    try {
      const made = await sendJson<TemplateSummaryDto>(`/api/templates/${template.id}/duplicate`, "POST", { name, description });
      onDone(made.id);
    } catch (e) {
      setError(errorText(e));
      setFieldErrors(fieldErrorsOf(e));
      setBusy(false);
    }
  }

  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title={`Duplicate “${template.name}”`}
      description="Make a variant to change without touching the original or the zones made from it." testId="duplicate-template-dialog">
      <form onSubmit={submit} noValidate className="space-y-3">
        <FormError message={error} />
        <div>
          <label htmlFor="dup-name" className={labelClass}>Name of the variant</label>
          <input id="dup-name" className={inputClass} value={name} onChange={(e) => setName(e.target.value)}
            aria-invalid={Boolean(fieldErrors.name)} aria-describedby="dup-name-error" />
          <FieldError id="dup-name-error" messages={fieldErrors.name} />
        </div>
        <div>
          <label htmlFor="dup-description" className={labelClass}>Description</label>
          <textarea id="dup-description" className={inputClass} rows={3} value={description} onChange={(e) => setDescription(e.target.value)} />
          <FieldError id="dup-description-error" messages={fieldErrors.description} />
        </div>
        <div className="flex justify-end gap-2">
          <button type="button" onClick={onClose} className={buttonClass}>Cancel</button>
          <button type="submit" disabled={busy} className={primaryButtonClass}>{busy ? "Duplicating…" : "Duplicate"}</button>
        </div>
      </form>
    </DialogShell>
  );
}
