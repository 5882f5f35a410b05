// Seeds the invented demo scenario into an empty database (once).
import { hashPassword } from "better-auth/crypto";
import { randomUUID } from "node:crypto";
import { eq, inArray } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { modelProfiles } from "@/lib/devices/model-profiles";
import { buildZoneConfig, type CurveForConfig } from "@/lib/zones/build-config";
import { contentHash } from "@/lib/zones/content-hash";
import { defaultDeviceSettings, defaultOutputLayout } from "@/lib/validation/zone-config";
import { demoFleetDevices } from "@/mocks/fleet/demo-devices";
import { companies, curves, demoPassword, homes, stationUrl, templates } from "@/db/seed-data";

export interface SeedResult {
  seeded: boolean;
  signIns: { email: string; role: string; company: string }[];
}

export async function seedDemo(databaseUrl: string, options: { force?: boolean } = {}): Promise<SeedResult> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 });
  const db = drizzle(pool, { schema, casing: "snake_case" });
  const signIns = companies.flatMap((c) => c.people.map((p) => ({ email: p.email, role: p.role, company: c.name })));
  try {
    const existing = await db.select({ id: schema.organization.id }).from(schema.organization).limit(1);
    if (existing.length > 0 && !options.force) return { seeded: false, signIns };
    const passwordHash = await hashPassword(demoPassword);

    await db.transaction(async (tx) => {
      await tx.insert(schema.modelProfiles).values(modelProfiles).onConflictDoNothing();

      const orgIds = new Map<string, string>();
      const userIds = new Map<string, string>();
      for (const company of companies) {
        const orgId = randomUUID();
        orgIds.set(company.key, orgId);
        await tx.insert(schema.organization).values({ id: orgId, name: company.name, slug: company.slug });
        for (const person of company.people) {
          const userId = randomUUID();
          userIds.set(person.key, userId);
          await tx.insert(schema.user).values({ id: userId, name: person.name, email: person.email, emailVerified: true });
          await tx.insert(schema.account).values({
            id: randomUUID(),
            accountId: userId,
            providerId: "credential",
            userId,
            password: passwordHash,
          });
          await tx.insert(schema.member).values({ id: randomUUID(), organizationId: orgId, userId, role: person.role });
        }
      }

      // Tone curves belong to the first company's library.
      const fernhill = orgIds.get("fernhill")!;
      const curveIds = new Map<string, string>();
      const curvesById = new Map<string, CurveForConfig>();
      for (const curve of curves) {
        const [row] = await tx
          .insert(schema.toneCurves)
          .values({ organizationId: fernhill, name: curve.name, description: curve.description })
          .returning({ id: schema.toneCurves.id });
        curveIds.set(curve.key, row.id);
        curvesById.set(row.id, { id: row.id, name: curve.name, bands: curve.bands });
        await tx
          .insert(schema.toneCurveBands)
          .values(curve.bands.map((b, position) => ({ curveId: row.id, position, ...b })));
      }

      const deviceIds = new Map<string, string>();
      const deviceOrg = (fleetId: string) => {
        const home = homes.find((h) => h.zones.some((z) => z.device === fleetId));
        return orgIds.get(home?.company ?? "fernhill")!;
      };
      for (const d of demoFleetDevices) {
        const [row] = await tx
          .insert(schema.devices)
          .values({
            organizationId: deviceOrg(d.fleetDeviceId),
            modelProfileId: d.modelProfileId,
            fleetDeviceId: d.fleetDeviceId,
            serial: d.serial,
            firmwareVersion: d.firmwareVersion,
            online: d.online,
          })
          .returning({ id: schema.devices.id });
        deviceIds.set(d.fleetDeviceId, row.id);
      }

      const seededZones: { homeKey: string; zoneName: string; zoneId: string; config: ReturnType<typeof buildZoneConfig> }[] = [];
      for (const home of homes) {
        const orgId = orgIds.get(home.company)!;
        const [homeRow] = await tx
          .insert(schema.homes)
          .values({ organizationId: orgId, name: home.name, householdName: home.householdName, city: home.city, servicePlan: home.servicePlan })
          .returning({ id: schema.homes.id });
        for (const key of home.household) {
          await tx.insert(schema.householdMembers).values({ homeId: homeRow.id, userId: userIds.get(key)! });
        }
        for (const key of home.installers) {
          await tx.insert(schema.homeAssignments).values({ homeId: homeRow.id, userId: userIds.get(key)! });
        }
        await tx.update(schema.devices).set({ homeId: homeRow.id }).where(
          // Bind each device named by a zone of this home to the home.
          inArray(
            schema.devices.fleetDeviceId,
            home.zones.map((z) => z.device),
          ),
        );

        for (const [position, zone] of home.zones.entries()) {
          const guest = zone.guest ?? { volume: true, source: true, wake: true };
          const zoneValues = {
            name: zone.name,
            volumeCeiling: zone.ceiling,
            turnOnVolume: zone.turnOn,
            guestVolume: guest.volume,
            guestSource: guest.source,
            guestWake: guest.wake,
            guestLocked: false,
            toneCurveId: zone.curve ? curveIds.get(zone.curve)! : null,
            deviceSettings: { ...defaultDeviceSettings, cecPower: zone.sources.some((s) => s.kind === "hdmi_arc"), cecVolume: zone.sources.some((s) => s.kind === "hdmi_arc") },
            outputLayout: zone.layout ?? defaultOutputLayout,
          };
          const [zoneRow] = await tx
            .insert(schema.zones)
            .values({
              organizationId: orgId,
              homeId: homeRow.id,
              deviceId: deviceIds.get(zone.device)!,
              position,
              ...zoneValues,
            })
            .returning({ id: schema.zones.id });
          const sourceRows = await tx
            .insert(schema.sources)
            .values(
              zone.sources.map((s, i) => ({
                zoneId: zoneRow.id,
                position: i,
                label: s.label,
                kind: s.kind,
                enabled: s.enabled ?? true,
                loudnessOffsetDb: s.offset,
                subsonic: s.subsonic ?? false,
                toneCurveId: s.curve ? curveIds.get(s.curve)! : null,
              })),
            )
            .returning();
          const presetRows = await tx
            .insert(schema.streamPresets)
            .values(
              zone.presets.map((p, i) => ({
                zoneId: zoneRow.id,
                position: i,
                name: p.name,
                streamUrl: stationUrl(p.name),
                genre: p.genre,
                loudnessOffsetDb: p.offset ?? 0,
                toneCurveId: p.curve ? curveIds.get(p.curve)! : null,
              })),
            )
            .returning();
          const config = buildZoneConfig({ zone: zoneValues, sources: sourceRows, presets: presetRows, curves: curvesById });
          const [revision] = await tx
            .insert(schema.zoneRevisions)
            .values({
              organizationId: orgId,
              zoneId: zoneRow.id,
              number: 1,
              contentHash: contentHash(config),
              config,
              authorId: null,
              message: "Configuration at hand-over",
            })
            .returning({ id: schema.zoneRevisions.id });
          await tx.update(schema.zones).set({ currentRevisionId: revision.id }).where(eq(schema.zones.id, zoneRow.id));
          seededZones.push({ homeKey: home.key, zoneName: zone.name, zoneId: zoneRow.id, config });
        }
      }

      for (const template of templates) {
        const source = seededZones.find((z) => z.homeKey === template.fromHome && z.zoneName === template.fromZone)!;
        const [row] = await tx
          .insert(schema.zoneTemplates)
          .values({
            organizationId: fernhill,
            name: template.name,
            description: template.description,
            config: { ...source.config, name: template.name },
            createdBy: userIds.get("theo")!,
          })
          .returning({ id: schema.zoneTemplates.id });
        const made = homes.flatMap((h) => h.zones.filter((z) => z.template === template.key).map((z) => ({ home: h.key, zone: z.name })));
        for (const m of made) {
          const zone = seededZones.find((z) => z.homeKey === m.home && z.zoneName === m.zone)!;
          await tx
            .update(schema.zones)
            .set({ templateId: row.id, templateVersion: 1 })
            .where(eq(schema.zones.id, zone.zoneId));
        }
      }

      await tx.insert(schema.auditEvents).values({
        organizationId: fernhill,
        actorUserId: userIds.get("mira")!,
        actorName: "Mira Castellanos",
        actorRole: "owner",
        kind: "company.seeded",
        summary: "Demo data loaded",
      });
    });
    return { seeded: true, signIns };
  } finally {
    await pool.end();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const url = process.env.DATABASE_URL ?? "postgres://zonewright@127.0.0.1:54329/zonewright";
  seedDemo(url, { force: process.argv.includes("--force") }).then(
    (r) => console.log(r.seeded ? "demo data seeded" : "database already has data; nothing seeded"),
    (error: Error) => {
      console.error(error);
      process.exit(1);
    },
  );
}
