import { diffZoneConfigs, summarizeDiff, type ConfigChange } from "@/lib/zones/config-diff";
import { zoneConfigSchema, type ZoneConfig } from "@/lib/validation/zone-config";

// Pure: does a zone's device report what we want? Compares the zone's desired
// configuration (its current revision) with the device's last reported one, field
// by field, through the general ZoneConfig diff (lib/zones/config-diff.ts).

export const driftStates = ["in_sync", "pending", "drifted", "offline", "never_reported", "no_device"] as const;
export type DriftState = (typeof driftStates)[number];

export const driftLabels: Record<DriftState, string> = {
  in_sync: "In sync",
  pending: "Pending",
  drifted: "Drifted",
  offline: "Offline",
  never_reported: "Never reported",
  no_device: "No device",
};

export interface DriftDeviceState {
  online: boolean;
  reportedConfig: ZoneConfig | null;
  reportedVersion: number;
  desiredVersion: number;
}

export interface DriftInput {
  desired: ZoneConfig | null;
  device: DriftDeviceState | null;
  /** A push target for this zone is queued, being sent or awaiting its report. */
  pushInFlight: boolean;
}

export interface DriftResult {
  state: DriftState;
  /** Desired → reported, field by field (empty when in sync or nothing reported). */
  changes: ConfigChange[];
  summary: string;
  /** One sentence for people. */
  explanation: string;
}

/**
 * Both sides go through the schema first: the fleet echoes a config with its
 * defaults filled in, so a stored revision without them must not look drifted.
 */
export function normalizeConfig(config: unknown): ZoneConfig | null {
  const parsed = zoneConfigSchema.safeParse(config);
  return parsed.success ? parsed.data : null;
}

export function computeDrift({ desired, device, pushInFlight }: DriftInput): DriftResult {
  if (!device) {
    return { state: "no_device", changes: [], summary: "No device", explanation: "No device is bound to this zone." };
  }
  const want = desired ? normalizeConfig(desired) : null;
  const got = device.reportedConfig ? normalizeConfig(device.reportedConfig) : null;
  const diff = want && got ? diffZoneConfigs(want, got) : null;
  const changes = diff?.changes ?? [];
  const summary = diff ? summarizeDiff(diff) : "Nothing reported";

  if (!device.online) {
    return {
      state: "offline",
      changes,
      summary,
      explanation: got
        ? `The device is offline. Its last report ${diff?.identical ? "matched" : "differed from"} the desired configuration.`
        : "The device is offline and has never reported a configuration.",
    };
  }
  if (pushInFlight || device.desiredVersion > device.reportedVersion) {
    return { state: "pending", changes, summary, explanation: "A push is on its way; the device has not reported it yet." };
  }
  if (!got || !want) {
    return {
      state: "never_reported",
      changes: [],
      summary: "Nothing reported",
      explanation: "The device has not reported a configuration yet. Push the zone to bring it in line.",
    };
  }
  if (diff!.identical) {
    return { state: "in_sync", changes: [], summary: "In sync", explanation: "The device reports exactly the desired configuration." };
  }
  return {
    state: "drifted",
    changes,
    summary,
    explanation: `The device reports ${changes.length} difference${changes.length === 1 ? "" : "s"} from the desired configuration.`,
  };
}
