import { describe, expect, it } from "vitest";
import { GET as listRoute, POST as createRoute } from "@/app/api/templates/route";
import { DELETE as deleteRoute, GET as getRoute, PATCH as patchRoute } from "@/app/api/templates/[templateId]/route";
import { POST as duplicateRoute } from "@/app/api/templates/[templateId]/duplicate/route";
import { GET as targetsRoute } from "@/app/api/templates/[templateId]/targets/route";
import { POST as applyRoute } from "@/app/api/templates/[templateId]/apply/route";
import { GET as previewRoute } from "@/app/api/templates/[templateId]/update-preview/route";
import { POST as updateRoute } from "@/app/api/templates/[templateId]/update/route";
import { PUT as overridesRoute } from "@/app/api/templates/[templateId]/zones/[zoneId]/overrides/route";
import type { TemplateDetailDto, TemplateSummaryDto, TemplateTargetsDto, TemplateUpdatePreview } from "@/db/queries/templates";
import type { ZoneConfig } from "@/lib/validation/zone-config";
import { query } from "./helpers/database";
import { callRoute, people, signInAs } from "./helpers/http";

// Templates: library, edit with versions, duplicate (variant), make a zone in a
// (new) home on a free device, and bulk update with local overrides kept.

type Route = Parameters<typeof callRoute>[0];

async function as(email: string, handler: Route, options: Omit<Parameters<typeof callRoute>[1], "cookie">) {
  return callRoute(handler, { ...options, cookie: await signInAs(email) });
}

async function templateId(name: string) {
  const [row] = await query<{ id: string }>("select id from zone_templates where name = $1", [name]);
  return row.id;
}

async function zoneRow(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number; template_version: number | null; volume_ceiling: number; overrides: string[] }>(
    "select z.id, z.version, z.template_version, z.volume_ceiling, z.overrides from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2 and z.deleted_at is null",
    [homeName, zoneName],
  );
  return row;
}

async function deviceId(fleetId: string) {
  const [row] = await query<{ id: string }>("select id from devices where fleet_device_id = $1", [fleetId]);
  return row.id;
}

async function revisionCount(zoneId: string) {
  const [row] = await query<{ n: number }>("select count(*)::int as n from zone_revisions where zone_id = $1", [zoneId]);
  return row.n;
}

async function detail(email: string, id: string) {
  const res = await as(email, getRoute, { path: `/api/templates/${id}`, params: { templateId: id } });
  expect(res.status).toBe(200);
  return res.json as unknown as TemplateDetailDto;
}

describe("the template library", () => {
  it("lists the company's templates with the zones made from each", async () => {
    const res = await as(people.installer, listRoute, { path: "/api/templates" });
    expect(res.status).toBe(200);
    const items = res.json.items as TemplateSummaryDto[];
    expect(items.map((t) => [t.name, t.version, t.zoneCount, t.behindCount])).toEqual([
      ["Family room with TV and subwoofer", 1, 1, 0],
      ["Outdoor pair with bass lift", 1, 3, 0],
    ]);
    expect(items[1].sourceLabels).toEqual(["Streaming", "Guest phone"]);
  });

  it("homeowners have no library; another company sees none of it", async () => {
    expect((await as(people.homeowner, listRoute, { path: "/api/templates" })).status).toBe(403);
    const other = await as(people.otherCompanyOwner, listRoute, { path: "/api/templates" });
    expect(other.json.items).toEqual([]);
    const id = await templateId("Outdoor pair with bass lift");
    const res = await as(people.otherCompanyOwner, getRoute, { path: `/api/templates/${id}`, params: { templateId: id } });
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.json)).not.toContain("Outdoor");
  });

  it("an integrator saves a zone as a template; support may not", async () => {
    const kitchen = await zoneRow("Lindqvist residence", "Kitchen");
    const refused = await as(people.support, createRoute, {
      method: "POST",
      path: "/api/templates",
      body: { zoneId: kitchen.id, name: "Kitchen with radio" },
    });
    expect(refused.status).toBe(403);
    const res = await as(people.integrator, createRoute, {
      method: "POST",
      path: "/api/templates",
      body: { zoneId: kitchen.id, name: "Kitchen with radio", description: "Bright room, radio on analog." },
    });
    expect(res.status).toBe(201);
    const made = await detail(people.integrator, res.json.id as string);
    expect(made.version).toBe(1);
    expect(made.config.sources.map((s) => [s.key, s.label])).toEqual([
      ["network_stream", "Streaming"],
      ["analog", "Kitchen radio"],
      ["bluetooth", "Phone"],
    ]);
    expect(made.config.zoneCurve?.name).toBe("Bright hard-surfaced room");
    const audit = await query<{ kind: string }>("select kind from audit_events where kind = 'template.created'");
    expect(audit).toHaveLength(1);
  });

  it("rejects a bad name with a field error and writes nothing", async () => {
    const kitchen = await zoneRow("Lindqvist residence", "Kitchen");
    const before = await query("select count(*)::int as n from zone_templates");
    const res = await as(people.integrator, createRoute, { method: "POST", path: "/api/templates", body: { zoneId: kitchen.id, name: "x" } });
    expect(res.status).toBe(400);
    expect(res.json.error?.fieldErrors).toHaveProperty("name");
    expect(await query("select count(*)::int as n from zone_templates")).toEqual(before);
  });

  it("renaming keeps the version; a stale version is refused", async () => {
    const id = await templateId("Kitchen with radio");
    const res = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: 1, name: "Kitchen with analog radio", description: "For kitchens with a radio on the analog input." },
    });
    expect(res.status).toBe(200);
    expect(res.json).toMatchObject({ name: "Kitchen with analog radio", version: 1 });
    const stale = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: 2, name: "Other" },
    });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("template:stale");
  });
});

describe("a variant and a zone in a new home (installer)", () => {
  it("an installer duplicates a template but may not edit or delete it", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const dup = await as(people.installer, duplicateRoute, {
      method: "POST",
      path: `/api/templates/${id}/duplicate`,
      params: { templateId: id },
      body: { name: "Outdoor pair, quiet neighbours" },
    });
    expect(dup.status).toBe(201);
    expect(dup.json).toMatchObject({ name: "Outdoor pair, quiet neighbours", version: 1, zoneCount: 0 });
    const edit = await as(people.installer, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: 1, name: "Mine now" },
    });
    expect(edit.status).toBe(403);
    const del = await as(people.installer, deleteRoute, { method: "DELETE", path: `/api/templates/${dup.json.id}`, params: { templateId: dup.json.id as string } });
    expect(del.status).toBe(403);
  });

  it("offers only free devices, with the reasons a device cannot take the template", async () => {
    const id = await templateId("Family room with TV and subwoofer");
    const res = await as(people.installer, targetsRoute, { path: `/api/templates/${id}/targets`, params: { templateId: id } });
    expect(res.status).toBe(200);
    const targets = res.json as unknown as TemplateTargetsDto;
    expect(targets.canCreateHome).toBe(true);
    // Installers work in the homes they are assigned to.
    expect(targets.homes.map((h) => h.name)).toEqual(["Aalto townhouse", "Lindqvist residence"]);
    expect(targets.devices.map((d) => d.serial).sort()).toEqual(["FW2-21400", "FW4-10555", "FWO-30388"]);
    const outdoor = targets.devices.find((d) => d.serial === "FWO-30388")!;
    expect(outdoor.problems.join(" ")).toMatch(/HDMI ARC/);
    expect(targets.devices.find((d) => d.serial === "FW4-10555")!.problems).toEqual([]);
  });

  it("an installer makes a zone from a template in a new home, bound to a spare device: revision 1, audit, assignment", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const spare = await deviceId("fd-spare-03");
    const res = await as(people.installer, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Garden terrace", deviceId: spare, newHome: { name: "Willow Row house", householdName: "Petrov family", city: "Millbrook" } },
    });
    expect(res.status).toBe(201);
    const made = res.json as { zoneId: string; home: { id: string; created: boolean }; revision: { number: number } };
    expect(made.home.created).toBe(true);
    expect(made.revision.number).toBe(1);
    const [zone] = await query<{ name: string; template_version: number; device_id: string; volume_ceiling: number; current_revision_id: string }>(
      "select name, template_version, device_id, volume_ceiling, current_revision_id from zones where id = $1",
      [made.zoneId],
    );
    expect(zone).toMatchObject({ name: "Garden terrace", template_version: 1, device_id: spare, volume_ceiling: 60 });
    const sources = await query<{ label: string; kind: string }>("select label, kind from sources where zone_id = $1 order by position", [made.zoneId]);
    expect(sources).toEqual([
      { label: "Streaming", kind: "network_stream" },
      { label: "Guest phone", kind: "bluetooth" },
    ]);
    const presets = await query<{ name: string }>("select name from stream_presets where zone_id = $1 order by position", [made.zoneId]);
    expect(presets.map((p) => p.name)).toEqual(["Velvet Hour Soul", "Tidepool Ambient"]);
    // The library curve is reattached, not copied.
    const [curve] = await query<{ name: string; n: number }>(
      "select c.name, (select count(*)::int from tone_curves where name like 'Small outdoor speakers%') as n from zones z join tone_curves c on c.id = z.tone_curve_id where z.id = $1",
      [made.zoneId],
    );
    expect(curve).toEqual({ name: "Small outdoor speakers – bass lift", n: 1 });
    const [revision] = await query<{ number: number; config: ZoneConfig; id: string }>("select id, number, config from zone_revisions where zone_id = $1", [made.zoneId]);
    expect(revision.number).toBe(1);
    expect(revision.id).toBe(zone.current_revision_id);
    expect(revision.config.name).toBe("Garden terrace");
    const [device] = await query<{ home_id: string }>("select home_id from devices where id = $1", [spare]);
    expect(device.home_id).toBe(made.home.id);
    const assigned = await query("select 1 from home_assignments a join \"user\" u on u.id = a.user_id where a.home_id = $1 and u.email = $2", [
      made.home.id,
      people.installer,
    ]);
    expect(assigned).toHaveLength(1);
    const audit = await query<{ kind: string }>("select kind from audit_events where home_id = $1 order by id", [made.home.id]);
    expect(audit.map((a) => a.kind)).toEqual(["home.created", "zone.created-from-template"]);
  });

  it("the same device cannot drive a second zone", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const [home] = await query<{ id: string }>("select id from homes where name = 'Willow Row house'");
    const zonesBefore = await query("select count(*)::int as n from zones");
    const res = await as(people.installer, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Side yard", deviceId: await deviceId("fd-spare-03"), homeId: home.id },
    });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("device:taken");
    expect(await query("select count(*)::int as n from zones")).toEqual(zonesBefore);
  });

  it("a device that cannot take the template is refused with the reasons, and nothing is written", async () => {
    const id = await templateId("Family room with TV and subwoofer");
    const [home] = await query<{ id: string }>("select id from homes where name = 'Willow Row house'");
    const homesBefore = await query("select count(*)::int as n from homes");
    const res = await as(people.installer, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Den", deviceId: await deviceId("fd-spare-01"), newHome: { name: "Should not exist", householdName: "Nobody" } },
    });
    expect(res.status).toBe(422);
    expect(res.json.error?.code).toBe("device:unsuitable");
    expect(res.json.error?.message).toMatch(/HDMI ARC/);
    // The new home of the refused request was rolled back with it.
    expect(await query("select count(*)::int as n from homes")).toEqual(homesBefore);
    expect(home.id).toBeTruthy();
  });

  it("an installer may not make a zone in a home they do not work on; a device of a home elsewhere is taken", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const [marchetti] = await query<{ id: string }>("select id from homes where name = 'Marchetti lake house'");
    const res = await as(people.installer, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Boathouse", deviceId: await deviceId("fd-spare-02"), homeId: marchetti.id },
    });
    expect(res.status).toBe(403);
    const [lindqvist] = await query<{ id: string }>("select id from homes where name = 'Lindqvist residence'");
    const elsewhere = await as(people.integrator, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Boathouse", deviceId: await deviceId("fd-spare-03"), homeId: lindqvist.id },
    });
    expect(elsewhere.status).toBe(409);
  });

  it("another company's device or home is not found", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const [lindqvist] = await query<{ id: string }>("select id from homes where name = 'Lindqvist residence'");
    const res = await as(people.integrator, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Boathouse", deviceId: await deviceId("fd-tidewater-lounge"), homeId: lindqvist.id },
    });
    expect(res.status).toBe(404);
    const [harbour] = await query<{ id: string }>("select id from homes where name = 'Harbour view apartment'");
    const home = await as(people.integrator, applyRoute, {
      method: "POST",
      path: `/api/templates/${id}/apply`,
      params: { templateId: id },
      body: { zoneName: "Boathouse", deviceId: await deviceId("fd-spare-02"), homeId: harbour.id },
    });
    expect(home.status).toBe(404);
  });
});

describe("a template changes: zones behind, preview, bulk update keeping overrides", () => {
  it("editing the configuration makes a new version and the library counts the zones behind", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const before = await detail(people.integrator, id);
    const config = structuredClone(before.config);
    config.volumeCeiling = 58;
    config.sources[1].loudnessOffsetDb = -3;
    config.presets.push({ key: "preset-3", name: "Copper Kettle Folk", streamUrl: "https://stream.example.net/copper-kettle-folk", genre: "Folk", loudnessOffsetDb: 0, toneCurve: null });
    const res = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: before.version, config },
    });
    expect(res.status).toBe(200);
    const after = res.json as unknown as TemplateDetailDto;
    expect(after.version).toBe(2);
    // Patio, Dock, Roof terrace at version 1; Garden terrace (made above) too.
    expect(after.behindCount).toBe(4);
    const [audit] = await query<{ kind: string; changes: { field: string }[] }>(
      "select kind, changes from audit_events where kind = 'template.edited' order by id desc limit 1",
    );
    expect(audit.changes.map((c) => c.field)).toEqual(expect.arrayContaining(["Zone · Volume ceiling"]));
  });

  it("refuses an invalid configuration with field errors (turn-on above ceiling, unknown curve)", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const current = await detail(people.integrator, id);
    const config = structuredClone(current.config);
    config.turnOnVolume = 90;
    const res = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: current.version, config },
    });
    expect(res.status).toBe(400);
    expect(res.json.error?.fieldErrors).toHaveProperty(["config.turnOnVolume"]);
    const curve = structuredClone(current.config);
    curve.zoneCurve = { id: "00000000-0000-4000-8000-000000000000", name: "Made up", bands: [] };
    const unknown = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: current.version, config: curve },
    });
    expect(unknown.status).toBe(400);
    expect(unknown.json.error?.fieldErrors).toHaveProperty(["config.zoneCurve"]);
    expect((await detail(people.integrator, id)).version).toBe(2);
  });

  it("a zone marks fields it sets itself", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const dock = await zoneRow("Marchetti lake house", "Dock");
    const bad = await as(people.integrator, overridesRoute, {
      method: "PUT",
      path: `/api/templates/${id}/zones/${dock.id}/overrides`,
      params: { templateId: id, zoneId: dock.id },
      body: { version: dock.version, overrides: ["password"] },
    });
    expect(bad.status).toBe(400);
    const res = await as(people.integrator, overridesRoute, {
      method: "PUT",
      path: `/api/templates/${id}/zones/${dock.id}/overrides`,
      params: { templateId: id, zoneId: dock.id },
      body: { version: dock.version, overrides: ["volumeCeiling"] },
    });
    expect(res.status).toBe(200);
    expect((await zoneRow("Marchetti lake house", "Dock")).overrides).toEqual(["volumeCeiling"]);
  });

  it("the preview lists, per zone, each field change and each field kept (and why)", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const res = await as(people.integrator, previewRoute, { path: `/api/templates/${id}/update-preview`, params: { templateId: id } });
    expect(res.status).toBe(200);
    const preview = res.json as unknown as TemplateUpdatePreview;
    expect(preview.template.version).toBe(2);
    const patio = preview.zones.find((z) => z.zoneName === "Patio")!;
    expect(patio.behind).toBe(true);
    expect(patio.changes.map((c) => c.text)).toEqual(
      expect.arrayContaining([
        "Zone: volume ceiling 60 % → 58 %",
        "Source “Guest phone”: loudness offset \u22122 dB → \u22123 dB",
        expect.stringMatching(/^Preset “Copper Kettle Folk” added/),
      ]),
    );
    const dock = preview.zones.find((z) => z.zoneName === "Dock")!;
    expect(dock.changes.map((c) => c.path)).not.toContain("volumeCeiling");
    expect(dock.kept).toEqual([
      { path: "volumeCeiling", label: "Volume ceiling (%)", reason: "override", text: "Volume ceiling (%): keeps 70 % (set in this zone; template: 58 %)" },
    ]);
    // The Dock already has Copper Kettle Folk; it gains Tidepool Ambient in the template's place.
    expect(dock.changes.map((c) => c.text)).toEqual(expect.arrayContaining([expect.stringMatching(/^Preset “Tidepool Ambient” added at position 2/)]));
    const terrace = preview.zones.find((z) => z.zoneName === "Roof terrace")!;
    expect(terrace.canApply).toBe(true);
  });

  it("bulk update: revisions per zone, overrides kept, a stale zone reported and left alone", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const patio = await zoneRow("Lindqvist residence", "Patio");
    const dock = await zoneRow("Marchetti lake house", "Dock");
    const terrace = await zoneRow("Aalto townhouse", "Roof terrace");
    const revisionsBefore = { patio: await revisionCount(patio.id), dock: await revisionCount(dock.id) };

    const stale = await as(people.integrator, updateRoute, {
      method: "POST",
      path: `/api/templates/${id}/update`,
      params: { templateId: id },
      body: { templateVersion: 1, zones: [{ zoneId: patio.id, version: patio.version }] },
    });
    expect(stale.status).toBe(409);
    expect(stale.json.error?.code).toBe("template:stale");

    const res = await as(people.integrator, updateRoute, {
      method: "POST",
      path: `/api/templates/${id}/update`,
      params: { templateId: id },
      body: {
        templateVersion: 2,
        zones: [
          { zoneId: patio.id, version: patio.version },
          { zoneId: dock.id, version: dock.version },
          { zoneId: terrace.id, version: terrace.version + 5 },
        ],
      },
    });
    expect(res.status).toBe(200);
    const results = res.json.results as { zoneId: string; ok: boolean; code?: string; revision?: { number: number; created: boolean } }[];
    expect(results.map((r) => [r.zoneId, r.ok, r.code ?? null])).toEqual([
      [patio.id, true, null],
      [dock.id, true, null],
      [terrace.id, false, "zone:stale"],
    ]);
    expect(await revisionCount(patio.id)).toBe(revisionsBefore.patio + 1);
    expect(await revisionCount(dock.id)).toBe(revisionsBefore.dock + 1);

    const patioAfter = await zoneRow("Lindqvist residence", "Patio");
    expect(patioAfter).toMatchObject({ template_version: 2, volume_ceiling: 58 });
    const dockAfter = await zoneRow("Marchetti lake house", "Dock");
    expect(dockAfter).toMatchObject({ template_version: 2, volume_ceiling: 70 });
    const phone = await query<{ loudness_offset_db: number }>("select loudness_offset_db from sources where zone_id = $1 and kind = 'bluetooth'", [dock.id]);
    expect(phone[0].loudness_offset_db).toBe(-3);
    const patioPresets = await query<{ name: string }>("select name from stream_presets where zone_id = $1 order by position", [patio.id]);
    expect(patioPresets.map((p) => p.name)).toEqual(["Velvet Hour Soul", "Tidepool Ambient", "Copper Kettle Folk"]);
    // The terrace was stale: untouched, still behind.
    expect(await zoneRow("Aalto townhouse", "Roof terrace")).toMatchObject({ template_version: 1, volume_ceiling: 62 });

    const [revision] = await query<{ config: ZoneConfig; message: string }>(
      "select config, message from zone_revisions where zone_id = $1 order by number desc limit 1",
      [dock.id],
    );
    expect(revision.config.volumeCeiling).toBe(70);
    expect(revision.message).toBe("Template “Outdoor pair with bass lift” version 2");
    const [audit] = await query<{ kind: string; changes: { field: string; after: unknown }[] }>(
      "select kind, changes from audit_events where zone_id = $1 order by id desc limit 1",
      [dock.id],
    );
    expect(audit.kind).toBe("zone.template-updated");
    expect(audit.changes).toContainEqual({ field: "kept: Volume ceiling (%)", before: null, after: "Volume ceiling (%): keeps 70 % (set in this zone; template: 58 %)" });

    const list = await as(people.integrator, listRoute, { path: "/api/templates" });
    const outdoor = (list.json.items as TemplateSummaryDto[]).find((t) => t.id === id)!;
    expect(outdoor.behindCount).toBe(2);
  });

  it("an installer updates only zones in homes they work on", async () => {
    const id = await templateId("Outdoor pair with bass lift");
    const terrace = await zoneRow("Aalto townhouse", "Roof terrace");
    const preview = await as(people.installer, previewRoute, { path: `/api/templates/${id}/update-preview`, params: { templateId: id } });
    const zonesSeen = (preview.json as unknown as TemplateUpdatePreview).zones;
    expect(zonesSeen.find((z) => z.zoneName === "Dock")!.canApply).toBe(false);
    const res = await as(people.installer, updateRoute, {
      method: "POST",
      path: `/api/templates/${id}/update`,
      params: { templateId: id },
      body: { templateVersion: 2, zones: [{ zoneId: terrace.id, version: terrace.version }] },
    });
    expect(res.status).toBe(200);
    expect((res.json.results as { ok: boolean }[])[0].ok).toBe(true);
    const dock = await zoneRow("Marchetti lake house", "Dock");
    const refused = await as(people.installer, updateRoute, {
      method: "POST",
      path: `/api/templates/${id}/update`,
      params: { templateId: id },
      body: { templateVersion: 2, zones: [{ zoneId: dock.id, version: dock.version }] },
    });
    expect((refused.json.results as { ok: boolean; code: string }[])[0]).toMatchObject({ ok: false, code: "auth:forbidden" });
  });
});

describe("deleting templates", () => {
  it("a template in use cannot be deleted; an unused one can", async () => {
    const used = await templateId("Outdoor pair with bass lift");
    const res = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/templates/${used}`, params: { templateId: used } });
    expect(res.status).toBe(409);
    expect(res.json.error?.code).toBe("template:in-use");
    const unused = await templateId("Outdoor pair, quiet neighbours");
    const ok = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/templates/${unused}`, params: { templateId: unused } });
    expect(ok.status).toBe(200);
    expect(await query("select 1 from zone_templates where id = $1", [unused])).toEqual([]);
    const again = await as(people.integrator, deleteRoute, { method: "DELETE", path: `/api/templates/${unused}`, params: { templateId: unused } });
    expect(again.status).toBe(404);
  });
});
