"use client";
import * as Dialog from "@radix-ui/react-dialog";
import { useState } from "react";
import type { StartPushResultDto } from "@/lib/fleet/push-service";
import type { PushScope } from "@/lib/validation/pushes";
import { PushPreviewDialogContent } from "./push-preview-dialog";

// A button that previews a push and, once confirmed, starts it and opens the
// push's page. Any scope:
//   <PushZoneButton scope={{ kind: "zone", zoneId }} />
//   <PushZoneButton scope={{ kind: "home", homeId }} label="Push this home" />
//   <PushZoneButton scope={{ kind: "rollback", zoneId, revisionId, restore: true, expectedVersion }} label="Roll back and push" />
// The server checks role and tenant again; hide the button with mayEver/can where it would be refused.

export function PushZoneButton({
  scope,
  label = "Push",
  className,
  onStarted,
  disabled,
}: {
  scope: PushScope;
  label?: string;
  className?: string;
  onStarted?: (result: StartPushResultDto) => void;
  disabled?: boolean;
}) {
  const [open, setOpen] = useState(false);
  return (
    <Dialog.Root open={open} onOpenChange={setOpen}>
      <Dialog.Trigger asChild>
        <button
          type="button"
          disabled={disabled}
          className={className ?? "rounded-md bg-accent-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-700 disabled:opacity-50"}
          data-testid="push-button"
        >
          {label}
        </button>
      </Dialog.Trigger>
      <PushPreviewDialogContent scope={scope} open={open} onDone={onStarted} />
    </Dialog.Root>
  );
}
