"use client";
import { DialogShell } from "@/components/ui/dialog-shell";
import type { ReactNode } from "react";

/** The curve, level-match and layout screens use the app's one dialog frame. */
export function AudioDialog(props: {
  open: boolean;
  onOpenChange: (open: boolean) => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
  testId?: string;
}) {
  return <DialogShell {...props} />;
}
