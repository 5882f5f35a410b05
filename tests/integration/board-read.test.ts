import { describe, expect, it } from "vitest";
import { GET as boardRoute } from "@/app/api/homes/[homeId]/board/route";
import { GET as healthRoute } from "@/app/api/health/route";
import type { BoardDto } from "@/lib/board/types";
import { query } from "./helpers/database";
import { as, homeIdByName } from "./helpers/board";
import { callRoute, people } from "./helpers/http";

async function board(email: string, homeName: string) {
  const homeId = await homeIdByName(homeName);
  return as(email, boardRoute, { path: `/api/homes/${homeId}/board`, params: { homeId } });
}

describe("GET /api/homes/:homeId/board", () => {
  it("gives an integrator every zone with device, profile, cards in order, curves and versions", async () => {
    const res = await board(people.integrator, "Lindqvist residence");
    expect(res.status).toBe(200);
    const dto = res.json as unknown as BoardDto;
    expect(dto.home.name).toBe("Lindqvist residence");
    expect(dto.zones.map((z) => z.name)).toEqual(["Family room", "Kitchen", "Patio", "Primary suite"]);
    const family = dto.zones[0];
    expect(family.version).toBe(1);
    expect(family.device).toMatchObject({ serial: "FW4-10231", online: true, profile: { id: "amp-4x100-sub", presetSlots: 20, eqBands: 10 } });
    expect(family.device!.profile.inputs).toContain("hdmi_arc");
    expect(family.sources.map((s) => s.label)).toEqual(["TV", "Turntable", "Streaming", "Phone"]);
    expect(family.sources[1]).toMatchObject({ kind: "analog", loudnessOffsetDb: 3, subsonic: true });
    expect(family.presets.map((p) => p.name)).toEqual([
      "Harbor Lantern Jazz",
      "Quiet Pines Classical",
      "Copper Kettle Folk",
      "Night Tram Electronica",
      "Saltmarsh Blues",
    ]);
    expect(family.guest).toEqual({ volume: true, source: true, wake: true, locked: false, lockedAt: null, lockedByName: null, lockReason: null });
    // Curve names resolve through the library that comes with the board.
    const byId = new Map(dto.curves.map((c) => [c.id, c]));
    expect(byId.get(family.sources[0].toneCurveId!)?.name).toBe("TV dialogue lift");
    expect(byId.get(family.sources[0].toneCurveId!)?.bands).toHaveLength(2);
    expect(dto.zones[1].toneCurveId && byId.get(dto.zones[1].toneCurveId)?.name).toBe("Bright hard-surfaced room");
    expect(dto.may).toEqual({ editZone: true, editGuest: true, lock: true, unlock: true, reorderPresets: true });
  });

  it("shows an offline device as offline", async () => {
    const res = await board(people.integrator, "Marchetti lake house");
    const loft = (res.json as unknown as BoardDto).zones.find((z) => z.name === "Guest loft")!;
    expect(loft.device?.online).toBe(false);
  });

  it("tells each role what it may do", async () => {
    const installerOwn = (await board(people.installer, "Aalto townhouse")).json as unknown as BoardDto;
    expect(installerOwn.may).toEqual({ editZone: true, editGuest: true, lock: false, unlock: false, reorderPresets: true });
    const installerOther = (await board(people.installer, "Brightwater loft")).json as unknown as BoardDto;
    expect(installerOther.may).toEqual({ editZone: false, editGuest: false, lock: false, unlock: false, reorderPresets: false });
    const support = (await board(people.support, "Aalto townhouse")).json as unknown as BoardDto;
    expect(support.may).toEqual({ editZone: false, editGuest: false, lock: true, unlock: true, reorderPresets: false });
    const homeowner = await board(people.homeowner, "Lindqvist residence");
    expect(homeowner.status).toBe(200);
    expect((homeowner.json as unknown as BoardDto).may).toMatchObject({ editZone: false, lock: false, unlock: false });
  });

  it("refuses without a session, and hides other companies' and other households' homes", async () => {
    const homeId = await homeIdByName("Lindqvist residence");
    const anonymous = await callRoute(boardRoute, { path: `/api/homes/${homeId}/board`, params: { homeId } });
    expect(anonymous.status).toBe(401);
    const other = await board(people.otherCompanyOwner, "Lindqvist residence");
    expect(other.status).toBe(404);
    expect(JSON.stringify(other.json)).not.toContain("Family room");
    const otherHousehold = await board(people.otherHomeowner, "Lindqvist residence");
    expect(otherHousehold.status).toBe(404);
    const bad = await as(people.integrator, boardRoute, { path: "/api/homes/nope/board", params: { homeId: "nope" } });
    expect(bad.status).toBe(400);
  });

  it("carries the latest measured true peak of a card's level-match clip", async () => {
    const homeId = await homeIdByName("Aalto townhouse");
    const [zone] = await query<{ id: string; organization_id: string }>("select id, organization_id from zones where home_id = $1 and name = 'Living room'", [homeId]);
    const [turntable] = await query<{ id: string }>("select id from sources where zone_id = $1 and label = 'Turntable'", [zone.id]);
    await query(
      `insert into level_match_clips (organization_id, zone_id, source_id, file_name, sample_rate, channel_count, duration_seconds, true_peak_dbtp, created_at)
       values ($1, $2, $3, 'old.wav', 48000, 2, 10, -6, now() - interval '1 day'), ($1, $2, $3, 'new.wav', 48000, 2, 10, -1.5, now())`,
      [zone.organization_id, zone.id, turntable.id],
    );
    const dto = (await board(people.integrator, "Aalto townhouse")).json as unknown as BoardDto;
    const living = dto.zones.find((z) => z.name === "Living room")!;
    expect(living.sources.find((s) => s.label === "Turntable")?.truePeakDbtp).toBe(-1.5);
    expect(living.sources.find((s) => s.label === "Computer")?.truePeakDbtp).toBeNull();
  });
});

describe("GET /api/health", () => {
  it("answers without a session or database", async () => {
    const res = await healthRoute();
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ ok: true });
  });
});
