import { describe, expect, it } from "vitest";
import { GET as listHomesRoute, POST as createHomeRoute } from "@/app/api/homes/route";
import { GET as getHomeRoute, PATCH as patchHomeRoute } from "@/app/api/homes/[homeId]/route";
import { GET as meRoute } from "@/app/api/me/route";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";

async function homeId(name: string) {
  const [row] = await query<{ id: string }>("select id from homes where name = $1", [name]);
  return row.id;
}

describe("sign-in and who am I", () => {
  it.each(Object.entries(people))("%s signs in and gets their role", async (key, email) => {
    const cookie = await signInAs(email);
    const res = await callRoute(meRoute, { path: "/api/me", cookie });
    expect(res.status).toBe(200);
    expect(res.json.email).toBe(email);
    const expectedRole = { otherHomeowner: "homeowner", otherCompanyOwner: "owner" }[key] ?? key;
    expect(res.json.role).toBe(expectedRole);
  });

  it("refuses a wrong password", async () => {
    const { auth } = await import("@/lib/auth");
    const response = await auth.api.signInEmail({ body: { email: people.owner, password: "not-the-password" }, asResponse: true });
    expect(response.status).toBe(401);
  });

  it("without a session the API answers 401, never data", async () => {
    const res = await callRoute(listHomesRoute, { path: "/api/homes" });
    expect(res.status).toBe(401);
    expect(res.json.error?.code).toBe("auth:unauthenticated");
    expect(res.json.items).toBeUndefined();
  });
});

describe("homes list", () => {
  it("lists the company's homes with zone counts, sorted and paginated", async () => {
    const cookie = await signInAs(people.integrator);
    const res = await callRoute(listHomesRoute, { path: "/api/homes?sort=zones&dir=desc&pageSize=5", cookie });
    expect(res.status).toBe(200);
    const items = res.json.items as { name: string; zoneCount: number }[];
    expect(res.json.total).toBe(5);
    expect(items[0]).toMatchObject({ name: "Lindqvist residence", zoneCount: 4 });
    expect(items.map((i) => i.zoneCount)).toEqual([...items.map((i) => i.zoneCount)].sort((a, b) => b - a));
    expect(items.some((i) => i.name === "Harbour view apartment")).toBe(false);
  });

  it("searches by household and city", async () => {
    const cookie = await signInAs(people.support);
    const res = await callRoute(listHomesRoute, { path: "/api/homes?search=alder%20bay", cookie });
    expect((res.json.items as { name: string }[]).map((i) => i.name).sort()).toEqual(["Brightwater loft", "Lindqvist residence"]);
  });

  it("rejects a bad query with field errors", async () => {
    const cookie = await signInAs(people.integrator);
    const res = await callRoute(listHomesRoute, { path: "/api/homes?sort=password&page=0", cookie });
    expect(res.status).toBe(400);
    expect(Object.keys(res.json.error!.fieldErrors!)).toEqual(expect.arrayContaining(["sort", "page"]));
  });

  it("a homeowner lists only their own home", async () => {
    const cookie = await signInAs(people.homeowner);
    const res = await callRoute(listHomesRoute, { path: "/api/homes", cookie });
    expect((res.json.items as { name: string }[]).map((i) => i.name)).toEqual(["Lindqvist residence"]);
  });
});

describe("one home", () => {
  it("another company's owner gets 404 for this company's home", async () => {
    const id = await homeId("Lindqvist residence");
    const cookie = await signInAs(people.otherCompanyOwner);
    const res = await callRoute(getHomeRoute, { path: `/api/homes/${id}`, params: { homeId: id }, cookie });
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain("Lindqvist");
  });

  it("a homeowner gets 404 for someone else's home, 200 for their own", async () => {
    const cookie = await signInAs(people.homeowner);
    const other = await homeId("Marchetti lake house");
    const own = await homeId("Lindqvist residence");
    expect((await callRoute(getHomeRoute, { path: `/api/homes/${other}`, params: { homeId: other }, cookie })).status).toBe(404);
    expect((await callRoute(getHomeRoute, { path: `/api/homes/${own}`, params: { homeId: own }, cookie })).status).toBe(200);
  });

  it("a malformed id is a 400, not a 500", async () => {
    const cookie = await signInAs(people.owner);
    const res = await callRoute(getHomeRoute, { path: "/api/homes/nope", params: { homeId: "nope" }, cookie });
    expect(res.status).toBe(400);
  });
});

describe("writing homes", () => {
  it("support may not create a home: 403 and nothing written", async () => {
    const cookie = await signInAs(people.support);
    const before = await query<{ n: number }>("select count(*)::int as n from homes");
    const res = await callRoute(createHomeRoute, {
      method: "POST",
      path: "/api/homes",
      cookie,
      body: { name: "Test home", householdName: "Test household" },
    });
    expect(res.status).toBe(403);
    expect(res.json.error?.code).toBe("auth:forbidden");
    expect(await query("select count(*)::int as n from homes")).toEqual(before);
  });

  it("a homeowner may not rename their home", async () => {
    const cookie = await signInAs(people.homeowner);
    const id = await homeId("Lindqvist residence");
    const res = await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${id}`, params: { homeId: id }, cookie, body: { name: "Mine", version: 1 } });
    expect(res.status).toBe(403);
  });

  it("an integrator creates a home, with an audit event in the same transaction", async () => {
    const cookie = await signInAs(people.integrator);
    const res = await callRoute(createHomeRoute, {
      method: "POST",
      path: "/api/homes",
      cookie,
      body: { name: "Quarry Lane barn", householdName: "Adebayo family", city: "Millbrook" },
    });
    expect(res.status).toBe(201);
    const audit = await query<{ kind: string; actor_role: string }>("select kind, actor_role from audit_events where home_id = $1", [res.json.id]);
    expect(audit).toEqual([{ kind: "home.created", actor_role: "integrator" }]);
  });

  it("invalid input gets field errors and writes nothing", async () => {
    const cookie = await signInAs(people.integrator);
    const before = await query<{ n: number }>("select count(*)::int as n from homes");
    const res = await callRoute(createHomeRoute, { method: "POST", path: "/api/homes", cookie, body: { name: "x", householdName: "" } });
    expect(res.status).toBe(400);
    expect(res.json.error?.fieldErrors).toHaveProperty("name");
    expect(res.json.error?.fieldErrors).toHaveProperty("householdName");
    expect(await query("select count(*)::int as n from homes")).toEqual(before);
  });

  it("broken JSON is a 400", async () => {
    const cookie = await signInAs(people.integrator);
    const res = await callRoute(createHomeRoute, { method: "POST", path: "/api/homes", cookie, rawBody: "{not json" });
    expect(res.status).toBe(400);
    expect(res.json.error?.code).toBe("request:bad-json");
  });

  it("a stale version gets 409 and changes nothing", async () => {
    const cookie = await signInAs(people.owner);
    const id = await homeId("Nakagawa cottage");
    const first = await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${id}`, params: { homeId: id }, cookie, body: { city: "Fernhill East", version: 1 } });
    expect(first.status).toBe(200);
    const stale = await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${id}`, params: { homeId: id }, cookie, body: { city: "Elsewhere", version: 1 } });
    expect(stale.status).toBe(409);
    expect(await query("select city from homes where id = $1", [id])).toEqual([{ city: "Fernhill East" }]);
  });
});

describe("partial updates", () => {
  it("a PATCH of one field leaves the others as they were", async () => {
    const cookie = await signInAs(people.integrator);
    const id = await homeId("Lindqvist residence");
    const [before] = await query<{ service_plan: string; city: string; version: number }>("select service_plan, city, version from homes where id = $1", [id]);
    const res = await callRoute(patchHomeRoute, { method: "PATCH", path: `/api/homes/${id}`, params: { homeId: id }, cookie, body: { notes: "Gate code with the household", version: before.version } });
    expect(res.status).toBe(200);
    expect(await query("select service_plan, city, notes from homes where id = $1", [id])).toEqual([
      { service_plan: before.service_plan, city: before.city, notes: "Gate code with the household" },
    ]);
  });
});
