import { describe, expect, it } from "vitest";
import { GET as teamRoute } from "@/app/api/team/route";
import { DELETE as removeRoute, PATCH as roleRoute } from "@/app/api/team/members/[memberId]/route";
import { DELETE as removeHouseholdRoute } from "@/app/api/team/households/[homeId]/members/[userId]/route";
import { GET as meRoute } from "@/app/api/me/route";
import type { TeamDto } from "@/db/queries/team";
import { query } from "./helpers/database";
import { callRoute, forgetSessions, people, signInAs } from "./helpers/http";

type Route = Parameters<typeof callRoute>[0];
async function as(email: string, handler: Route, options: Omit<Parameters<typeof callRoute>[1], "cookie">) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

async function memberId(email: string) {
  const [row] = await query<{ id: string }>(
    `select m.id from member m join "user" u on u.id = m.user_id join organization o on o.id = m.organization_id
     where u.email = $1 and o.slug = 'fernhill-audio-works'`,
    [email],
  );
  return row.id;
}

function patchRole(email: string, id: string, role: string) {
  return as(email, roleRoute, { method: "PATCH", path: `/api/team/members/${id}`, params: { memberId: id }, body: { role } });
}

describe("the team page's data", () => {
  it("lists staff with roles and assigned homes, and households per home; never password hashes", async () => {
    const res = await as(people.support, teamRoute, { path: "/api/team" });
    expect(res.status).toBe(200);
    const team = res.json as unknown as TeamDto;
    expect(team.members.map((m) => [m.name, m.role])).toEqual([
      ["Mira Castellanos", "owner"],
      ["Theo Banerjee", "integrator"],
      ["Jonah Whitlock", "installer"],
      ["Priya Raman", "support"],
    ]);
    expect(team.members.find((m) => m.role === "installer")!.assignedHomes.map((h) => h.name)).toEqual(["Aalto townhouse", "Lindqvist residence"]);
    expect(team.households.find((h) => h.home.name === "Lindqvist residence")!.members.map((m) => m.email)).toEqual([people.homeowner]);
    expect(JSON.stringify(team)).not.toMatch(/password|scrypt|Tidewater|Rafael/i);
  });

  it("lists homes with their households a page at a time, searched by home, household or city", async () => {
    // 2,000 more homes of the same company: the page must not grow with them.
    await query(
      `insert into homes (organization_id, name, household_name, city)
       select o.id, 'Paging home ' || lpad(g::text, 4, '0'), 'Paging household ' || g, 'Paging City'
       from organization o, generate_series(1, 2000) g where o.slug = 'fernhill-audio-works'`,
    );
    const first = (await as(people.integrator, teamRoute, { path: "/api/team" })).json as unknown as TeamDto;
    expect(first.households).toHaveLength(24);
    expect(first.householdPageSize).toBe(24);
    expect(first.householdTotal).toBe(2005);
    expect(first.householdPage).toBe(1);

    const found = await as(people.integrator, teamRoute, { path: "/api/team?hsearch=lindqvist" });
    const byName = found.json as unknown as TeamDto;
    expect(byName.households.map((h) => h.home.name)).toEqual(["Lindqvist residence"]);
    expect(byName.households[0].members.map((m) => m.email)).toEqual([people.homeowner]);
    expect(byName.householdSearch).toBe("lindqvist");

    const last = (await as(people.integrator, teamRoute, { path: "/api/team?hsearch=Paging%20City&hpage=84" })).json as unknown as TeamDto;
    expect(last.householdTotal).toBe(2000);
    expect(last.households.map((h) => h.home.name)).toEqual(["Paging home 1993", "Paging home 1994", "Paging home 1995", "Paging home 1996", "Paging home 1997", "Paging home 1998", "Paging home 1999", "Paging home 2000"]);
    // A pattern character is searched for as itself.
    expect(((await as(people.integrator, teamRoute, { path: "/api/team?hsearch=%25" })).json as unknown as TeamDto).householdTotal).toBe(0);

    const bad = await as(people.integrator, teamRoute, { path: "/api/team?hpage=0" });
    expect(bad.status).toBe(400);
    expect(bad.json.error?.fieldErrors?.hpage).toBeDefined();
    await query("delete from homes where name like 'Paging home %'");
  });

  it("homeowners have no team page", async () => {
    expect((await as(people.homeowner, teamRoute, { path: "/api/team" })).status).toBe(403);
  });
});

describe("changing roles and removing people", () => {
  it("only the owner changes roles", async () => {
    const id = await memberId(people.support);
    const res = await patchRole(people.integrator, id, "integrator");
    expect(res.status).toBe(403);
    const [row] = await query<{ role: string }>("select role from member where id = $1", [id]);
    expect(row.role).toBe("support");
  });

  it("the owner makes support an integrator; the change is audited and takes effect", async () => {
    const id = await memberId(people.support);
    const res = await patchRole(people.owner, id, "integrator");
    expect(res.status).toBe(200);
    const [audit] = await query<{ kind: string; changes: unknown }>("select kind, changes from audit_events where kind = 'team.role-changed'");
    expect(audit.changes).toEqual([{ field: `role of ${people.support}`, before: "support", after: "integrator" }]);
    const me = await as(people.support, meRoute, { path: "/api/me" });
    expect(me.json.role).toBe("integrator");
    await patchRole(people.owner, id, "support");
  });

  it("refuses a role that is not a team role", async () => {
    const id = await memberId(people.installer);
    const res = await patchRole(people.owner, id, "homeowner");
    expect(res.status).toBe(400);
    expect((await patchRole(people.owner, id, "superuser")).status).toBe(400);
  });

  it("the last owner can be neither demoted nor removed", async () => {
    const owner = await memberId(people.owner);
    const demote = await patchRole(people.owner, owner, "integrator");
    expect(demote.status).toBe(409);
    expect(demote.json.error?.code).toBe("team:last-owner");
    const remove = await as(people.owner, removeRoute, { method: "DELETE", path: `/api/team/members/${owner}`, params: { memberId: owner } });
    expect(remove.status).toBe(409);
    const [row] = await query<{ role: string }>("select role from member where id = $1", [owner]);
    expect(row.role).toBe("owner");
  });

  it("with a second owner, the first may step down", async () => {
    const theo = await memberId(people.integrator);
    expect((await patchRole(people.owner, theo, "owner")).status).toBe(200);
    const mira = await memberId(people.owner);
    expect((await patchRole(people.owner, mira, "integrator")).status).toBe(200);
    // Theo is now the only owner.
    const back = await patchRole(people.integrator, theo, "integrator");
    expect(back.status).toBe(409);
    expect((await patchRole(people.integrator, mira, "owner")).status).toBe(200);
    expect((await patchRole(people.owner, theo, "integrator")).status).toBe(200);
  });

  it("removing an installer ends their access and their home assignments", async () => {
    const id = await memberId(people.installer);
    const res = await as(people.owner, removeRoute, { method: "DELETE", path: `/api/team/members/${id}`, params: { memberId: id } });
    expect(res.status).toBe(200);
    const assignments = await query(`select 1 from home_assignments a join "user" u on u.id = a.user_id where u.email = $1`, [people.installer]);
    expect(assignments).toEqual([]);
    forgetSessions();
    const cookie = await signInAs(people.installer);
    const me = await callRoute(meRoute, { path: "/api/me", cookie });
    expect(me.status).toBe(401);
  });

  it("another company's member is not found", async () => {
    const [rafael] = await query<{ id: string }>(`select m.id from member m join "user" u on u.id = m.user_id where u.email = $1`, [people.otherCompanyOwner]);
    const res = await as(people.owner, removeRoute, { method: "DELETE", path: `/api/team/members/${rafael.id}`, params: { memberId: rafael.id } });
    expect(res.status).toBe(404);
  });

  it("an integrator takes a homeowner out of a household; with their last home goes their membership", async () => {
    const [home] = await query<{ id: string }>("select id from homes where name = 'Marchetti lake house'");
    const [marco] = await query<{ id: string }>(`select id from "user" where email = $1`, [people.otherHomeowner]);
    const installer = await as(people.support, removeHouseholdRoute, {
      method: "DELETE",
      path: `/api/team/households/${home.id}/members/${marco.id}`,
      params: { homeId: home.id, userId: marco.id },
    });
    expect(installer.status).toBe(403);
    const res = await as(people.integrator, removeHouseholdRoute, {
      method: "DELETE",
      path: `/api/team/households/${home.id}/members/${marco.id}`,
      params: { homeId: home.id, userId: marco.id },
    });
    expect(res.status).toBe(200);
    expect(res.json.endedMembership).toBe(true);
    expect(await query("select 1 from household_members where user_id = $1", [marco.id])).toEqual([]);
    expect(await query("select 1 from member where user_id = $1", [marco.id])).toEqual([]);
  });
});
