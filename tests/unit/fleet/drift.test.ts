import { describe, expect, it } from "vitest";
import { computeDrift } from "@/lib/fleet/drift";
import { zoneConfig } from "./zone-config-fixture";

// Drift = reported ≠ desired (PRODUCT.md vocabulary); the comparison is the
// general ZoneConfig diff (lib/zones/config-diff.ts), desired → reported.
const device = (over: Partial<Parameters<typeof computeDrift>[0]["device"] & object> = {}) => ({
  online: true,
  reportedConfig: zoneConfig(),
  reportedVersion: 3,
  desiredVersion: 3,
  ...over,
});

describe("computeDrift", () => {
  it("in sync when the device reports exactly the desired configuration", () => {
    expect(computeDrift({ desired: zoneConfig(), device: device(), pushInFlight: false })).toMatchObject({ state: "in_sync", changes: [] });
  });

  it("a report with the schema's defaults filled in is still in sync (fleet echoes parsed configs)", () => {
    const desired = zoneConfig();
    const stored = JSON.parse(JSON.stringify(desired));
    delete stored.zoneCurve.bands[0].enabled; // the fixture's schema default
    expect(computeDrift({ desired: stored, device: device(), pushInFlight: false }).state).toBe("in_sync");
  });

  it("drifted, field by field, when the device changed on its own", () => {
    const result = computeDrift({ desired: zoneConfig(), device: device({ reportedConfig: zoneConfig({ volumeCeiling: 85 }) }), pushInFlight: false });
    expect(result.state).toBe("drifted");
    expect(result.changes).toHaveLength(1);
    expect(result.changes[0]).toMatchObject({ field: "Volume ceiling", beforeText: "70 %", afterText: "85 %" });
    expect(result.explanation).toBe("The device reports 1 difference from the desired configuration.");
  });

  it("pending while a push is under way or the fleet holds a newer desired version", () => {
    const other = device({ reportedConfig: zoneConfig({ volumeCeiling: 85 }) });
    expect(computeDrift({ desired: zoneConfig(), device: other, pushInFlight: true }).state).toBe("pending");
    expect(computeDrift({ desired: zoneConfig(), device: { ...other, desiredVersion: 4 }, pushInFlight: false }).state).toBe("pending");
  });

  it("offline comes first, and still shows the last known difference", () => {
    const result = computeDrift({ desired: zoneConfig(), device: device({ online: false, reportedConfig: zoneConfig({ turnOnVolume: 30 }) }), pushInFlight: true });
    expect(result.state).toBe("offline");
    expect(result.changes.map((c) => c.field)).toEqual(["Turn-on volume"]);
  });

  it("never reported, and no device, are their own states", () => {
    expect(computeDrift({ desired: zoneConfig(), device: device({ reportedConfig: null, reportedVersion: 0, desiredVersion: 0 }), pushInFlight: false }).state).toBe("never_reported");
    expect(computeDrift({ desired: zoneConfig(), device: null, pushInFlight: false }).state).toBe("no_device");
  });
});
