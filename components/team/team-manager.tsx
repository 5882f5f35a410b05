"use client";
import { useState } from "react";
import useSWR from "swr";
import { DialogShell, FieldError, FormError, inputClass, labelClass } from "@/components/board/dialog-shell";
import { Badge, buttonClass, dangerButtonClass, errorText, fieldErrorsOf, Notice, primaryButtonClass } from "@/components/templates/ui";
import type { InvitationDto } from "@/db/queries/invitations";
import type { TeamDto, TeamMemberDto } from "@/db/queries/team";
import { useHydrated } from "@/components/ui/use-hydrated";
import { sendJson, type ApiError } from "@/lib/fetcher";
import { roleLabels, staffRoles, type Role } from "@/lib/permissions";
import { teamSearch } from "@/lib/validation/team";

export const teamKey = "/api/team";
export const invitationsKey = "/api/invitations";

export interface TeamRights {
  canManage: boolean;
  canInviteTeam: boolean;
  canInviteHousehold: boolean;
}

const roleHelp: Record<Role, string> = {
  owner: "everything, including the team",
  integrator: "edits every home, zone, curve and template; pushes",
  installer: "makes zones from templates, edits and pushes in the homes they work on",
  support: "sees everything, locks guest controls, re-pushes known-good revisions",
  homeowner: "sees their own home; reorders their stations",
};

const stateTone = { pending: "accent", accepted: "neutral", expired: "caution", revoked: "neutral" } as const;
const dateFmt = (iso: string) => new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric" });

function InviteForm({
  mode,
  homes,
  onSent,
}: {
  mode: "team" | "household";
  homes: { id: string; name: string }[];
  onSent: (message: string) => void;
}) {
  const [email, setEmail] = useState("");
  const [role, setRole] = useState<Role>("installer");
  const [homeId, setHomeId] = useState("");
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const prefix = mode === "team" ? "team-invite" : "household-invite";

  async function submit(event: React.FormEvent) {
    event.preventDefault();
    setBusy(true);
    setError(null);
    setFieldErrors({});
    try {
      const body = mode === "team" ? { email, role } : { email, role: "homeowner", homeId };
      const sent = await sendJson<InvitationDto>(invitationsKey, "POST", body);
      setEmail("");
      onSent(`Invitation sent to ${sent.email}${sent.home ? ` for ${sent.home.name}` : ` as ${roleLabels[sent.role].toLowerCase()}`}. The link works once, until ${dateFmt(sent.expiresAt)}.`);
    } catch (e) {
      setError(errorText(e));
      setFieldErrors(fieldErrorsOf(e));
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} noValidate className="rounded-lg border border-slate-200 bg-white p-4" aria-label={mode === "team" ? "Invite a team member" : "Invite a household member"}
      data-testid={`${prefix}-form`}>
      <FormError message={error} />
      <div className="grid gap-3 sm:grid-cols-[2fr_1fr_auto] sm:items-end">
        <div>
          <label htmlFor={`${prefix}-email`} className={labelClass}>E-mail address</label>
          <input id={`${prefix}-email`} type="email" autoComplete="off" className={inputClass} value={email} onChange={(e) => setEmail(e.target.value)}
            aria-invalid={Boolean(fieldErrors.email)} aria-describedby={`${prefix}-email-error`} />
          <FieldError id={`${prefix}-email-error`} messages={fieldErrors.email} />
        </div>
        {mode === "team" ? (
          <div>
            <label htmlFor={`${prefix}-role`} className={labelClass}>Role</label>
            <select id={`${prefix}-role`} className={inputClass} value={role} onChange={(e) => setRole(e.target.value as Role)} aria-describedby={`${prefix}-role-help`}>
              {staffRoles.map((r) => <option key={r} value={r}>{roleLabels[r]}</option>)}
            </select>
          </div>
        ) : (
          <div>
            <label htmlFor={`${prefix}-home`} className={labelClass}>Home</label>
            <select id={`${prefix}-home`} className={inputClass} value={homeId} onChange={(e) => setHomeId(e.target.value)}
              aria-invalid={Boolean(fieldErrors.homeId)} aria-describedby={`${prefix}-home-error`}>
              <option value="">Choose a home…</option>
              {homes.map((h) => <option key={h.id} value={h.id}>{h.name}</option>)}
            </select>
            <FieldError id={`${prefix}-home-error`} messages={fieldErrors.homeId} />
          </div>
        )}
        <button type="submit" disabled={busy} className={primaryButtonClass}>{busy ? "Sending…" : "Send invitation"}</button>
      </div>
      {mode === "team" ? (
        <p id={`${prefix}-role-help`} className="mt-2 text-xs text-slate-500">{roleLabels[role]}: {roleHelp[role]}.</p>
      ) : (
        <p className="mt-2 text-xs text-slate-500">A household member sees only that home, in plain words, and may put their favourite stations in order.</p>
      )}
    </form>
  );
}

function RemoveDialog({ member, onClose, onDone }: { member: TeamMemberDto; onClose: () => void; onDone: (message: string) => void }) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  async function remove() {
    setBusy(true);
    setError(null);
    try {
      await sendJson(`/api/team/members/${member.memberId}`, "DELETE");
      onDone(`${member.name} was removed from the team.`);
    } catch (e) {
      setError(errorText(e));
      setBusy(false);
    }
  }
  return (
    <DialogShell open onOpenChange={(o) => (o ? undefined : onClose())} title={`Remove ${member.name}?`}
      description={`${member.email} will be signed out and can no longer open your company’s homes. Their home assignments end too.`} testId="remove-member-dialog">
      <FormError message={error} />
      <div className="flex justify-end gap-2">
        <button type="button" className={buttonClass} onClick={onClose}>Cancel</button>
        <button type="button" className={dangerButtonClass} onClick={remove} disabled={busy}>{busy ? "Removing…" : "Remove from the team"}</button>
      </div>
    </DialogShell>
  );
}

function HouseholdRange({ team, busy }: { team: TeamDto; busy: boolean }) {
  const first = team.householdTotal === 0 ? 0 : (team.householdPage - 1) * team.householdPageSize + 1;
  const last = Math.min(team.householdTotal, team.householdPage * team.householdPageSize);
  return (
    <p className="text-sm text-slate-600" role="status" data-testid="household-range">
      {team.householdTotal > 0 ? `Homes ${first}–${last} of ${team.householdTotal.toLocaleString("en-GB")}` : ""}
      {busy ? " · loading…" : ""}
    </p>
  );
}

function HouseholdPager({ team, go }: { team: TeamDto; go: (page: number) => void }) {
  const pages = Math.max(1, Math.ceil(team.householdTotal / team.householdPageSize));
  if (pages <= 1) return null;
  return (
    <nav aria-label="Pages of homes" className="flex items-center gap-2 text-sm">
      <button type="button" className={buttonClass} disabled={team.householdPage <= 1} onClick={() => go(team.householdPage - 1)}>Previous</button>
      <span className="text-slate-600">Page {team.householdPage} of {pages}</span>
      <button type="button" className={buttonClass} disabled={team.householdPage >= pages} onClick={() => go(team.householdPage + 1)}>Next</button>
    </nav>
  );
}

/** Team members and roles, households per home, and invitations. */
export function TeamManager({ rights, invitableHomes }: { rights: TeamRights; invitableHomes: { id: string; name: string }[] }) {
  const hydrated = useHydrated();
  // Households come a page at a time (a company may look after thousands of homes).
  const [householdQuery, setHouseholdQuery] = useState({ hsearch: "", hpage: 1 });
  const [searchText, setSearchText] = useState("");
  const { data: team, error, mutate, isValidating } = useSWR<TeamDto, ApiError>(`${teamKey}${teamSearch(householdQuery)}`, { keepPreviousData: true });
  const canSeeInvitations = rights.canInviteTeam || rights.canInviteHousehold;
  const { data: invitations, mutate: mutateInvitations } = useSWR<{ items: InvitationDto[] }, ApiError>(canSeeInvitations ? invitationsKey : null);
  const [notice, setNotice] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [removing, setRemoving] = useState<TeamMemberDto | null>(null);
  const [busyRow, setBusyRow] = useState<string | null>(null);

  async function changeRole(member: TeamMemberDto, role: Role) {
    if (!team) return;
    setBusyRow(member.memberId);
    setNotice(null);
    // Optimistic; rolled back with a message if refused.
    await mutate({ ...team, members: team.members.map((m) => (m.memberId === member.memberId ? { ...m, role } : m)) }, { revalidate: false });
    try {
      await sendJson(`/api/team/members/${member.memberId}`, "PATCH", { role });
      setNotice({ tone: "ok", text: `${member.name} is now ${roleLabels[role].toLowerCase()}.` });
    } catch (e) {
      setNotice({ tone: "error", text: `${member.name}’s role was not changed: ${errorText(e)}` });
    } finally {
      setBusyRow(null);
      await mutate();
    }
  }

  async function removeFromHousehold(homeId: string, homeName: string, userId: string, name: string) {
    setNotice(null);
    try {
      await sendJson(`/api/team/households/${homeId}/members/${userId}`, "DELETE");
      setNotice({ tone: "ok", text: `${name} no longer sees ${homeName}.` });
    } catch (e) {
      setNotice({ tone: "error", text: errorText(e) });
    }
    await mutate();
  }

  async function withdraw(invitation: InvitationDto) {
    setNotice(null);
    try {
      await sendJson(`/api/invitations/${invitation.id}`, "DELETE");
      setNotice({ tone: "ok", text: `The invitation of ${invitation.email} was withdrawn; its link no longer works.` });
    } catch (e) {
      setNotice({ tone: "error", text: errorText(e) });
    }
    await mutateInvitations();
  }

  if (error) {
    return (
      <Notice tone="error">
        The team could not be loaded: {error.message}{" "}
        <button type="button" className="underline" onClick={() => mutate()}>Retry</button>
      </Notice>
    );
  }
  if (!team) return <p role="status">Loading…</p>;

  return (
    <div className="space-y-8" data-testid="team-manager" data-hydrated={hydrated}>
      <div aria-live="polite">{notice ? <Notice tone={notice.tone} testId="team-notice">{notice.text}</Notice> : null}</div>

      <section aria-labelledby="team-heading" className="space-y-3">
        <h2 id="team-heading" className="text-lg font-semibold">Team</h2>
        <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
          <table className="w-full text-left text-sm" data-testid="team-table">
            <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th scope="col" className="px-4 py-2">Name</th>
                <th scope="col" className="px-4 py-2">E-mail</th>
                <th scope="col" className="px-4 py-2">Role</th>
                <th scope="col" className="px-4 py-2">Works on</th>
                <th scope="col" className="px-4 py-2">Since</th>
                {rights.canManage ? <th scope="col" className="px-4 py-2"><span className="sr-only">Actions</span></th> : null}
              </tr>
            </thead>
            <tbody className="divide-y divide-slate-100">
              {team.members.map((m) => {
                const lastOwner = m.role === "owner" && team.ownerCount <= 1;
                return (
                  <tr key={m.memberId} data-testid="team-row">
                    <td className="px-4 py-2 font-medium">{m.name}{m.isYou ? <span className="ml-1 text-xs text-slate-500">(you)</span> : null}</td>
                    <td className="px-4 py-2">{m.email}</td>
                    <td className="px-4 py-2">
                      {rights.canManage ? (
                        <>
                          <label htmlFor={`role-${m.memberId}`} className="sr-only">Role of {m.name}</label>
                          <select id={`role-${m.memberId}`} value={m.role} disabled={busyRow === m.memberId}
                            onChange={(e) => changeRole(m, e.target.value as Role)}
                            className="rounded-md border border-slate-300 px-2 py-1 text-sm" aria-describedby={lastOwner ? `last-owner-${m.memberId}` : undefined}>
                            {staffRoles.map((r) => <option key={r} value={r} disabled={lastOwner && r !== "owner"}>{roleLabels[r]}</option>)}
                          </select>
                          {lastOwner ? <span id={`last-owner-${m.memberId}`} className="ml-2 text-xs text-slate-500">only owner</span> : null}
                        </>
                      ) : (
                        roleLabels[m.role]
                      )}
                    </td>
                    <td className="px-4 py-2 text-slate-600">{m.role === "installer" ? (m.assignedHomes.map((h) => h.name).join(", ") || "no homes yet") : "all homes"}</td>
                    <td className="px-4 py-2 text-slate-600">{dateFmt(m.since)}</td>
                    {rights.canManage ? (
                      <td className="px-4 py-2 text-right">
                        <button type="button" className={dangerButtonClass} disabled={lastOwner} onClick={() => setRemoving(m)}
                          title={lastOwner ? "The company must keep at least one owner." : undefined} aria-label={`Remove ${m.name}`}>
                          Remove
                        </button>
                      </td>
                    ) : null}
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        {rights.canInviteTeam ? (
          <InviteForm mode="team" homes={[]} onSent={(text) => { setNotice({ tone: "ok", text }); void mutateInvitations(); }} />
        ) : null}
      </section>

      <section aria-labelledby="households-heading" className="space-y-3">
        <h2 id="households-heading" className="text-lg font-semibold">Households</h2>
        <form
          role="search"
          className="flex flex-wrap items-center gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            setHouseholdQuery({ hsearch: searchText.trim(), hpage: 1 });
          }}
        >
          <label htmlFor="household-search" className="text-sm text-slate-600">Find a home</label>
          <input id="household-search" type="search" value={searchText} onChange={(e) => setSearchText(e.target.value)}
            placeholder="Home, household or city" maxLength={100} className="w-64 rounded-md border border-slate-300 px-2 py-1 text-sm" />
          <button type="submit" className={buttonClass}>Search</button>
          {team.householdSearch ? (
            <button type="button" className="text-sm text-accent-700 underline" onClick={() => { setSearchText(""); setHouseholdQuery({ hsearch: "", hpage: 1 }); }}>
              Show all homes
            </button>
          ) : null}
        </form>
        <HouseholdRange team={team} busy={isValidating} />
        {team.households.length === 0 ? (
          <p className="text-sm text-slate-600" data-testid="households-empty">
            {team.householdSearch ? `No home matches “${team.householdSearch}”.` : "No homes yet."}
          </p>
        ) : null}
        <ul className="grid gap-3 md:grid-cols-2">
          {team.households.map((h) => (
            <li key={h.home.id} className="rounded-lg border border-slate-200 bg-white p-3" data-testid="household-card">
              <h3 className="font-medium">{h.home.name} <span className="text-sm font-normal text-slate-500">· {h.home.householdName}</span></h3>
              {h.members.length === 0 ? <p className="text-sm text-slate-500">Nobody from the household has a sign-in yet.</p> : null}
              <ul className="mt-1 space-y-1 text-sm">
                {h.members.map((m) => (
                  <li key={m.userId} className="flex items-center justify-between gap-2">
                    <span>{m.name} <span className="text-slate-500">{m.email}</span></span>
                    {rights.canInviteHousehold ? (
                      <button type="button" className="text-xs text-danger-700 underline" aria-label={`Remove ${m.name} from ${h.home.name}`}
                        onClick={() => removeFromHousehold(h.home.id, h.home.name, m.userId, m.name)}>
                        remove
                      </button>
                    ) : null}
                  </li>
                ))}
              </ul>
            </li>
          ))}
        </ul>
        <HouseholdPager team={team} go={(hpage) => setHouseholdQuery((q) => ({ ...q, hpage }))} />
        {rights.canInviteHousehold ? (
          <InviteForm mode="household" homes={invitableHomes} onSent={(text) => { setNotice({ tone: "ok", text }); void mutateInvitations(); }} />
        ) : null}
      </section>

      {canSeeInvitations ? (
        <section aria-labelledby="invitations-heading" className="space-y-3">
          <h2 id="invitations-heading" className="text-lg font-semibold">Invitations</h2>
          {invitations && invitations.items.length === 0 ? <p className="text-sm text-slate-600">No invitations sent yet.</p> : null}
          {invitations && invitations.items.length > 0 ? (
            <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
              <table className="w-full text-left text-sm" data-testid="invitations-table">
                <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
                  <tr>
                    <th scope="col" className="px-4 py-2">E-mail</th>
                    <th scope="col" className="px-4 py-2">For</th>
                    <th scope="col" className="px-4 py-2">State</th>
                    <th scope="col" className="px-4 py-2">Sent</th>
                    <th scope="col" className="px-4 py-2"><span className="sr-only">Actions</span></th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-slate-100">
                  {invitations.items.map((i) => (
                    <tr key={i.id}>
                      <td className="px-4 py-2">{i.email}</td>
                      <td className="px-4 py-2">{i.home ? `Household of ${i.home.name}` : roleLabels[i.role]}</td>
                      <td className="px-4 py-2">
                        <Badge tone={stateTone[i.state]}>{i.state}</Badge>
                        {i.state === "pending" ? <span className="ml-1 text-xs text-slate-500">until {dateFmt(i.expiresAt)}</span> : null}
                      </td>
                      <td className="px-4 py-2 text-slate-600">{dateFmt(i.createdAt)}{i.invitedBy ? ` by ${i.invitedBy}` : ""}</td>
                      <td className="px-4 py-2 text-right">
                        {i.state === "pending" ? (
                          <button type="button" className={buttonClass} onClick={() => withdraw(i)} aria-label={`Withdraw the invitation of ${i.email}`}>Withdraw</button>
                        ) : null}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          ) : null}
        </section>
      ) : null}

      {removing ? (
        <RemoveDialog member={removing} onClose={() => setRemoving(null)}
          onDone={(text) => { setRemoving(null); setNotice({ tone: "ok", text }); void mutate(); }} />
      ) : null}
    </div>
  );
}
