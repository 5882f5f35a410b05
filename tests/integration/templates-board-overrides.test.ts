import { describe, expect, it } from "vitest";
import { PATCH as settingsRoute } from "@/app/api/zones/[zoneId]/settings/route";
import { PUT as attachRoute } from "@/app/api/zones/[zoneId]/attach-curve/route";
import { GET as getRoute, PATCH as patchRoute } from "@/app/api/templates/[templateId]/route";
import { GET as previewRoute } from "@/app/api/templates/[templateId]/update-preview/route";
import { POST as updateRoute } from "@/app/api/templates/[templateId]/update/route";
import type { TemplateDetailDto, TemplateUpdatePreview } from "@/db/queries/templates";
import { query } from "./helpers/database";
import { as, curveIdByName, sourcesOf } from "./helpers/board";
import { people } from "./helpers/http";

// An edit made on the board to a zone that came from a template is remembered
// as a local override, so a later template update keeps it (and says why).

async function zone(homeName: string, zoneName: string) {
  const [row] = await query<{ id: string; version: number; overrides: string[]; volume_ceiling: number }>(
    "select z.id, z.version, z.overrides, z.volume_ceiling from zones z join homes h on h.id = z.home_id where h.name = $1 and z.name = $2",
    [homeName, zoneName],
  );
  return row;
}

async function templateId(name: string) {
  const [row] = await query<{ id: string }>("select id from zone_templates where name = $1", [name]);
  return row.id;
}

describe("board edits of a templated zone become overrides", () => {
  it("a ceiling and a curve set on the board are kept through a template update", async () => {
    const patio = await zone("Lindqvist residence", "Patio");
    expect(patio.overrides).toEqual([]);
    const ceiling = await as(people.integrator, settingsRoute, {
      method: "PATCH",
      path: `/api/zones/${patio.id}/settings`,
      params: { zoneId: patio.id },
      body: { version: patio.version, volumeCeiling: 64 },
    });
    expect(ceiling.status).toBe(200);
    expect((await zone("Lindqvist residence", "Patio")).overrides).toEqual(["volumeCeiling"]);
    const [streaming] = await sourcesOf(patio.id);
    const curve = await as(people.integrator, attachRoute, {
      method: "PUT",
      path: `/api/zones/${patio.id}/attach-curve`,
      params: { zoneId: patio.id },
      body: { version: patio.version + 1, target: { type: "source", id: streaming.id }, toneCurveId: await curveIdByName("Gym punch") },
    });
    expect(curve.status).toBe(200);
    const overrides = (await zone("Lindqvist residence", "Patio")).overrides;
    expect(overrides[0]).toBe("volumeCeiling");
    expect(overrides).toHaveLength(2);
    expect(overrides[1]).toBe("sources[network_stream].toneCurve");

    // The template moves on: ceiling 58 %.
    const id = await templateId("Outdoor pair with bass lift");
    const template = (await as(people.integrator, getRoute, { path: `/api/templates/${id}`, params: { templateId: id } })).json as unknown as TemplateDetailDto;
    const config = structuredClone(template.config);
    config.volumeCeiling = 58;
    const edited = await as(people.integrator, patchRoute, {
      method: "PATCH",
      path: `/api/templates/${id}`,
      params: { templateId: id },
      body: { version: template.version, config },
    });
    expect(edited.status).toBe(200);
    const preview = (await as(people.integrator, previewRoute, { path: `/api/templates/${id}/update-preview`, params: { templateId: id } }))
      .json as unknown as TemplateUpdatePreview;
    const patioPreview = preview.zones.find((z) => z.zoneName === "Patio")!;
    expect(patioPreview.changes.map((c) => c.path)).not.toContain("volumeCeiling");
    expect(patioPreview.kept).toContainEqual(expect.objectContaining({ path: "volumeCeiling", reason: "override", text: "Volume ceiling (%): keeps 64 % (set in this zone; template: 58 %)" }));
    // A zone nobody edited locally takes the new ceiling.
    const terracePreview = preview.zones.find((z) => z.zoneName === "Roof terrace")!;
    expect(terracePreview.changes.map((c) => c.path)).toContain("volumeCeiling");

    // The bulk update itself is not a local edit: it adds no overrides.
    const current = await zone("Lindqvist residence", "Patio");
    const updated = await as(people.integrator, updateRoute, {
      method: "POST",
      path: `/api/templates/${id}/update`,
      params: { templateId: id },
      body: { templateVersion: template.version + 1, zones: [{ zoneId: current.id, version: current.version }] },
    });
    expect(updated.status).toBe(200);
    const after = await zone("Lindqvist residence", "Patio");
    expect(after.volume_ceiling).toBe(64);
    expect(after.overrides).toEqual(current.overrides);
  });

  it("a zone without a template keeps no override list", async () => {
    const kitchen = await zone("Lindqvist residence", "Kitchen");
    const res = await as(people.integrator, settingsRoute, {
      method: "PATCH",
      path: `/api/zones/${kitchen.id}/settings`,
      params: { zoneId: kitchen.id },
      body: { version: kitchen.version, volumeCeiling: 61 },
    });
    expect(res.status).toBe(200);
    expect((await zone("Lindqvist residence", "Kitchen")).overrides).toEqual([]);
  });
});
