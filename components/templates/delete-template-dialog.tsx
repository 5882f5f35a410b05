"use client";
import { useState } from "react";
import { DialogShell, FormError } from "@/components/board/dialog-shell";
import type { TemplateSummaryDto } from "@/db/queries/templates";
import { sendJson } from "@/lib/fetcher";
import { buttonClass, dangerButtonClass, errorText } from "./ui";

export function DeleteTemplateDialog({
  template,
  onClose,
  onDone,
}: {
  template: Pick<TemplateSummaryDto, "id" | "name">;
  onClose: () => void;
  onDone: () => void;
}) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function remove() {
    setBusy(true);
    setError(null);
    try {
      await sendJson(`/api/templates/${template.id}`, "DELETE");
      onDone();
    } catch (e) {
      setError(errorText(e));
      setBusy(false);
    }
  }
  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title={`Delete “${template.name}”?`}
      description="No zone uses it. Zones are never affected; the template itself cannot be brought back." testId="delete-template-dialog">
      <FormError message={error} />
      <div className="flex justify-end gap-2">
        <button type="button" onClick={onClose} className={buttonClass}>Keep it</button>
        <button type="button" onClick={remove} disabled={busy} className={dangerButtonClass}>{busy ? "Deleting…" : "Delete template"}</button>
      </div>
    </DialogShell>
  );
}
