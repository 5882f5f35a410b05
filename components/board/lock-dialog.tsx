"use client";
import { useEffect, useId, useState, type FormEvent } from "react";
import { lockSentence } from "@/lib/board/rules";
import type { ZoneColumnDto } from "@/lib/board/types";
import { guestLockSchema, guestUnlockSchema, type GuestControlFlags } from "@/lib/validation/board";
import { DialogButtons, DialogShell, FieldError, FormError, inputClass, labelClass } from "./dialog-shell";
import { zodFieldErrors, type FieldErrors } from "./form-utils";
import type { WriteOutcome } from "./use-board";

/**
 * Lock a zone's guest controls (support's fix stays put) or unlock them; both
 * need a reason, and both land in the audit trail.
 */
export function LockDialog({
  open,
  onOpenChange,
  zone,
  mode,
  onLock,
  onUnlock,
}: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  zone: ZoneColumnDto;
  mode: "lock" | "unlock";
  onLock: (values: { reason: string; guestControls: GuestControlFlags }) => Promise<WriteOutcome>;
  onUnlock: (values: { reason: string }) => Promise<WriteOutcome>;
}) {
  const uid = useId();
  const [reason, setReason] = useState("");
  const [flags, setFlags] = useState<GuestControlFlags>({ volume: zone.guest.volume, source: zone.guest.source, wake: zone.guest.wake });
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    if (open) {
      setReason("");
      setFlags({ volume: zone.guest.volume, source: zone.guest.source, wake: zone.guest.wake });
      setErrors({});
      setFormError(null);
    }
    // Reset only when the dialog opens, not on every board refresh behind it.
  }, [open]);

  async function submit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    // The version is added when the write is sent; check the rest with the server's schema.
    const parsed =
      mode === "lock" ? guestLockSchema.safeParse({ version: 1, reason, guestControls: flags }) : guestUnlockSchema.safeParse({ version: 1, reason });
    if (!parsed.success) {
      setErrors(zodFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    setBusy(true);
    const outcome = mode === "lock" ? await onLock({ reason: parsed.data.reason, guestControls: flags }) : await onUnlock({ reason: parsed.data.reason });
    setBusy(false);
    if (outcome.ok) {
      onOpenChange(false);
      return;
    }
    setErrors(outcome.error?.fieldErrors ?? {});
    setFormError(outcome.error?.message ?? "Not saved.");
  }

  return (
    <DialogShell
      open={open}
      onOpenChange={onOpenChange}
      title={mode === "lock" ? `Lock guest controls of ${zone.name}` : `Unlock guest controls of ${zone.name}`}
      description={
        mode === "lock"
          ? "While locked, only support, an integrator or the owner can change this zone; installers and the household's phones and apps cannot undo your fix."
          : `${lockSentence(zone)}.`
      }
      testId="lock-dialog"
    >
      <form onSubmit={submit} noValidate>
        <FormError message={formError} />
        {mode === "lock" ? (
          <fieldset className="mb-4">
            <legend className="text-sm font-semibold">Lock with phones and apps allowed to…</legend>
            <div className="mt-2 flex flex-wrap gap-4 text-sm">
              {(
                [
                  ["volume", "change the volume"],
                  ["source", "switch the source"],
                  ["wake", "wake the zone"],
                ] as const
              ).map(([key, label]) => (
                <label key={key} className="flex items-center gap-2">
                  <input type="checkbox" checked={flags[key]} onChange={(e) => setFlags({ ...flags, [key]: e.target.checked })} /> {label}
                </label>
              ))}
            </div>
          </fieldset>
        ) : null}
        <label htmlFor={`${uid}-reason`} className={labelClass}>
          Reason {mode === "lock" ? "for the lock" : "for unlocking"}
        </label>
        <textarea
          id={`${uid}-reason`}
          className={inputClass}
          rows={3}
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          aria-invalid={errors.reason ? true : undefined}
          aria-describedby={errors.reason ? `${uid}-reason-error` : undefined}
          placeholder={mode === "lock" ? "e.g. Guests kept raising the patio volume past midnight" : "e.g. Household asked to restore guest volume"}
        />
        <FieldError id={`${uid}-reason-error`} messages={errors.reason} />
        <DialogButtons onCancel={() => onOpenChange(false)} submitLabel={mode === "lock" ? "Lock" : "Unlock"} busy={busy} />
      </form>
    </DialogShell>
  );
}
