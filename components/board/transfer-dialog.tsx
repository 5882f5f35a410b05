"use client";
import { useState } from "react";
import { DialogShell, FormError } from "./dialog-shell";
import type { WriteOutcome } from "./use-board";

/** After a preset is dropped on another zone: move it, or copy it? */
export function TransferDialog({
  open,
  onOpenChange,
  presetName,
  fromName,
  toName,
  moveRefusal,
  copyRefusal,
  onChoose,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  presetName: string;
  fromName: string;
  toName: string;
  moveRefusal: string | null;
  copyRefusal: string | null;
  onChoose: (mode: "move" | "copy") => Promise<WriteOutcome>;
}) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function choose(mode: "move" | "copy") {
    setBusy(true);
    setError(null);
    const outcome = await onChoose(mode);
    setBusy(false);
    if (outcome.ok) onOpenChange(false);
    else setError(outcome.error?.message ?? "Not saved.");
  }

  return (
    <DialogShell
      open={open}
      onOpenChange={(o) => {
        if (!o) setError(null);
        onOpenChange(o);
      }}
      title={`“${presetName}” to ${toName}`}
      description={`Move it from ${fromName} to ${toName}, or copy it and keep it in ${fromName} too. It goes to the end of ${toName}’s presets.`}
      testId="transfer-dialog"
    >
      <FormError message={error} />
      <div className="space-y-2">
        <div>
          <button
            type="button"
            disabled={busy || moveRefusal !== null}
            onClick={() => choose("move")}
            className="w-full rounded-md bg-accent-600 px-3 py-2 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50"
          >
            Move to {toName}
          </button>
          {moveRefusal ? <p className="mt-1 text-xs text-danger-700">{moveRefusal}</p> : null}
        </div>
        <div>
          <button
            type="button"
            disabled={busy || copyRefusal !== null}
            onClick={() => choose("copy")}
            className="w-full rounded-md px-3 py-2 text-sm font-medium ring-1 ring-accent-500 hover:bg-accent-50 disabled:opacity-50"
          >
            Copy to {toName}
          </button>
          {copyRefusal ? <p className="mt-1 text-xs text-danger-700">{copyRefusal}</p> : null}
        </div>
        <button type="button" onClick={() => onOpenChange(false)} className="w-full rounded-md px-3 py-2 text-sm ring-1 ring-slate-300 hover:bg-slate-50">
          Cancel — leave it where it is
        </button>
      </div>
    </DialogShell>
  );
}
