"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import useSWR from "swr";
import { EmptyState } from "@/components/ui/empty-state";
import type { TemplateSummaryDto } from "@/db/queries/templates";
import { useHydrated } from "@/components/ui/use-hydrated";
import type { ApiError } from "@/lib/fetcher";
import { ApplyTemplateDialog } from "./apply-template-dialog";
import { DeleteTemplateDialog } from "./delete-template-dialog";
import { DuplicateTemplateDialog } from "./duplicate-template-dialog";
import { SaveZoneDialog } from "./save-zone-dialog";
import { Badge, buttonClass, dangerButtonClass, primaryButtonClass } from "./ui";

export interface TemplateRights {
  canEdit: boolean;
  canDuplicate: boolean;
  canApply: boolean;
  canPush: boolean;
}

export const templatesKey = "/api/templates";

type Open = { kind: "apply" | "duplicate" | "delete"; template: TemplateSummaryDto } | { kind: "save" } | null;

/** The library of zone templates: what each holds, how many zones use it, how many are behind. */
export function TemplateLibrary({ rights }: { rights: TemplateRights }) {
  const router = useRouter();
  const hydrated = useHydrated();
  const { data, error, mutate } = useSWR<{ items: TemplateSummaryDto[] }, ApiError>(templatesKey);
  const [open, setOpen] = useState<Open>(null);
  const close = () => setOpen(null);
  const items = data?.items ?? [];

  return (
    <section className="space-y-3" data-testid="template-library" data-hydrated={hydrated}>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">Zone templates</h1>
          <p className="text-sm text-slate-600">
            Reusable zone designs: sources, stations, loudness offsets, tone curves, ceilings, guest controls and output layout.
          </p>
        </div>
        {rights.canEdit ? (
          <button type="button" className={primaryButtonClass} onClick={() => setOpen({ kind: "save" })}>
            Save a zone as a template
          </button>
        ) : null}
      </div>

      {error ? (
        <div role="alert" className="flex items-center justify-between gap-3 rounded-md bg-danger-50 p-3 text-sm text-danger-700">
          <span>Templates could not be loaded: {error.message}</span>
          <button type="button" onClick={() => mutate()} className={buttonClass}>Retry</button>
        </div>
      ) : null}

      {data && items.length === 0 ? (
        <EmptyState title="No zone templates yet.">
          {rights.canEdit ? "Open a well-tuned zone’s home and save it as a template, or use the button above." : "Integrators save zones as templates here."}
        </EmptyState>
      ) : null}

      <ul className="grid gap-3 md:grid-cols-2" data-testid="template-list">
        {items.map((t) => (
          <li key={t.id} className="flex flex-col rounded-lg border border-slate-200 bg-white p-4 shadow-sm" data-testid="template-card">
            <div className="flex flex-wrap items-start justify-between gap-2">
              <h2 className="font-semibold">
                <Link href={`/library/templates/${t.id}`} className="text-accent-700 hover:underline">{t.name}</Link>
              </h2>
              <div className="flex flex-wrap gap-1">
                <Badge>version {t.version}</Badge>
                <Badge tone="accent">{t.zoneCount} zone{t.zoneCount === 1 ? "" : "s"}</Badge>
                {t.behindCount > 0 ? (
                  <Link href={`/library/templates/${t.id}#update`} data-testid="behind-badge">
                    <Badge tone="caution">{t.behindCount} behind</Badge>
                  </Link>
                ) : null}
              </div>
            </div>
            {t.description ? <p className="mt-1 text-sm text-slate-600">{t.description}</p> : null}
            <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-0.5 text-sm">
              <dt className="text-slate-500">Sources</dt>
              <dd>{t.sourceLabels.length ? t.sourceLabels.join(", ") : "none"}</dd>
              <dt className="text-slate-500">Stations</dt>
              <dd className="tabular-nums">{t.presetCount}</dd>
              <dt className="text-slate-500">Volume ceiling</dt>
              <dd className="tabular-nums">{t.volumeCeiling} %</dd>
            </dl>
            <div className="mt-3 flex flex-wrap gap-2 pt-1">
              {rights.canApply ? (
                <button type="button" className={primaryButtonClass} onClick={() => setOpen({ kind: "apply", template: t })}>
                  Use in a home
                </button>
              ) : null}
              {rights.canDuplicate ? (
                <button type="button" className={buttonClass} onClick={() => setOpen({ kind: "duplicate", template: t })}>
                  Duplicate
                </button>
              ) : null}
              <Link href={`/library/templates/${t.id}`} className={buttonClass}>
                {rights.canEdit ? "Open and edit" : "Open"}
              </Link>
              {rights.canEdit ? (
                <button
                  type="button"
                  className={dangerButtonClass}
                  disabled={t.zoneCount > 0}
                  title={t.zoneCount > 0 ? `Used by ${t.zoneCount} zone${t.zoneCount === 1 ? "" : "s"}; it can be deleted once no zone uses it.` : undefined}
                  aria-label={`Delete ${t.name}`}
                  onClick={() => setOpen({ kind: "delete", template: t })}
                >
                  Delete
                </button>
              ) : null}
            </div>
          </li>
        ))}
      </ul>

      {open?.kind === "apply" ? (
        <ApplyTemplateDialog template={open.template} onClose={close} onDone={() => mutate()} />
      ) : null}
      {open?.kind === "duplicate" ? (
        <DuplicateTemplateDialog
          template={open.template}
          onClose={close}
          onDone={(id) => {
            void mutate();
            router.push(`/library/templates/${id}`);
          }}
        />
      ) : null}
      {open?.kind === "delete" ? (
        <DeleteTemplateDialog
          template={open.template}
          onClose={close}
          onDone={() => {
            void mutate();
            close();
          }}
        />
      ) : null}
      {open?.kind === "save" ? (
        <SaveZoneDialog
          onClose={close}
          onDone={(id) => {
            void mutate();
            router.push(`/library/templates/${id}`);
          }}
        />
      ) : null}
    </section>
  );
}
