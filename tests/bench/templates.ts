/**
 * Zone template benchmark:
 *   node --conditions=react-server --import tsx tests/bench/templates.ts [--sizes=100,1000] [--runs=3]
 *
 * For each size N: a fresh database on the test cluster (`zonewright_bench_templates`),
 * the demo data, and N more zones made from "Outdoor pair with bass lift" (copies of
 * the Patio with its sources and stations; every 10th keeps its own volume ceiling).
 * The template's configuration then changes (ceiling, an offset, one more station),
 * and it measures, through the real data-access functions:
 *  - the library list (counts of zones and of zones behind);
 *  - the update preview of all N + 3 zones (field-by-field changes and kept fields);
 *  - the bulk update of every zone (one transaction, revision and audit event each).
 * Prints figures only (medians over --runs where a step can repeat); asserts nothing.
 */
import { performance } from "node:perf_hooks";
import { cpus, loadavg } from "node:os";
import { startLocalPostgres, testCluster } from "../../db/local-postgres";
import { runMigrations } from "../../db/migrate";
import { seedDemo } from "../../db/seed";

const arg = (name: string, fallback: string) => process.argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3) ?? fallback;
const sizes = arg("sizes", "100,1000").split(",").map(Number).filter((n) => n > 0);
const runs = Math.max(1, Number(arg("runs", "3")));

function median(values: number[]) {
  const s = [...values].sort((a, b) => a - b);
  const mid = Math.floor(s.length / 2);
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

async function timed<T>(fn: () => Promise<T>): Promise<[T, number]> {
  const t = performance.now();
  const result = await fn();
  return [result, performance.now() - t];
}

const suffix = process.env.ZW_TEST_INSTANCE ? `_${process.env.ZW_TEST_INSTANCE}` : "";
const pgInfo = await startLocalPostgres({ ...testCluster, database: `zonewright_bench_templates${suffix}`, reset: true, log: () => {} });
process.env.DATABASE_URL = pgInfo.url;
process.env.ZW_ENV ??= "test";
// Imported only now: the database client reads DATABASE_URL when it is first loaded.
const { db, pool } = await import("../../db/client");
const { sql } = await import("drizzle-orm");
const { loadActor } = await import("../../db/queries/actors");
const templates = await import("../../db/queries/templates");

console.log(`machine: ${cpus().length} cores, load ${loadavg().map((l) => l.toFixed(1)).join(" ")}; runs per step: ${runs}`);
console.log("N zones | list (ms) | preview (ms) | preview per zone | bulk update (s) | per zone (ms) | revisions made | kept ceilings");

for (const n of sizes) {
  await db.execute(sql.raw(`drop schema public cascade; create schema public; drop schema if exists drizzle cascade;`));
  await runMigrations(pgInfo.url);
  await seedDemo(pgInfo.url, { force: true });

  const [{ patio, theo, template }] = (
    await db.execute<{ patio: string; theo: string; template: string }>(sql`
      select (select z.id from zones z join homes h on h.id = z.home_id where h.name = 'Lindqvist residence' and z.name = 'Patio') as patio,
             (select id from "user" where email = 'theo@fernhill.example') as theo,
             (select id from zone_templates where name = 'Outdoor pair with bass lift') as template`)
  ).rows;

  // N copies of the Patio in one large home, each with its sources and stations.
  await db.execute(sql`
    with home as (
      insert into homes (organization_id, name, household_name, city)
      select organization_id, 'Bench estate', 'Bench household', 'Nowhere' from zones where id = ${patio}
      returning id
    ), made as (
      insert into zones (organization_id, home_id, name, position, volume_ceiling, turn_on_volume, guest_volume, guest_source, guest_wake,
                         tone_curve_id, device_settings, output_layout, template_id, template_version, overrides)
      select z.organization_id, home.id, 'Terrace ' || g, g, case when g % 10 = 0 then 66 else z.volume_ceiling end, z.turn_on_volume,
             z.guest_volume, z.guest_source, z.guest_wake, z.tone_curve_id, z.device_settings, z.output_layout, z.template_id, 1,
             case when g % 10 = 0 then '["volumeCeiling"]'::jsonb else '[]'::jsonb end
      from zones z, home, generate_series(1, ${n}) g where z.id = ${patio}
      returning id
    ), s as (
      insert into sources (zone_id, position, label, kind, enabled, loudness_offset_db, subsonic, tone_curve_id)
      select made.id, s.position, s.label, s.kind, s.enabled, s.loudness_offset_db, s.subsonic, s.tone_curve_id
      from made cross join sources s where s.zone_id = ${patio}
    )
    insert into stream_presets (zone_id, position, name, stream_url, genre, loudness_offset_db, tone_curve_id)
    select made.id, p.position, p.name, p.stream_url, p.genre, p.loudness_offset_db, p.tone_curve_id
    from made cross join stream_presets p where p.zone_id = ${patio}`);

  const actor = (await loadActor({ userId: theo, activeOrganizationId: null }))!;
  const before = await templates.getTemplate({ actor, templateId: template });
  const config = structuredClone(before.config);
  config.volumeCeiling = 58;
  config.sources[1].loudnessOffsetDb = -3;
  config.presets.push({ key: "preset-3", name: "Copper Kettle Folk", streamUrl: "https://stream.example.net/copper-kettle-folk", genre: "Folk", loudnessOffsetDb: 0, toneCurve: null });
  await templates.updateTemplate({ actor, templateId: template, input: { version: before.version, config } });

  const listTimes: number[] = [];
  const previewTimes: number[] = [];
  let preview: Awaited<ReturnType<typeof templates.previewTemplateUpdate>> | null = null;
  for (let i = 0; i < runs; i++) {
    listTimes.push((await timed(() => templates.listTemplates({ actor })))[1]);
    const [p, ms] = await timed(() => templates.previewTemplateUpdate({ actor, templateId: template }));
    preview = p;
    previewTimes.push(ms);
  }
  const zonesToUpdate = preview!.zones.filter((z) => z.canApply && z.problems.length === 0).map((z) => ({ zoneId: z.zoneId, version: z.version }));
  const [result, updateMs] = await timed(() =>
    templates.applyTemplateUpdate({ actor, templateId: template, input: { templateVersion: preview!.template.version, zones: zonesToUpdate } }),
  );
  const ok = result.results.filter((r) => r.ok).length;
  const [{ kept }] = (
    await db.execute<{ kept: number }>(sql`select count(*)::int as kept from zones where template_id = ${template} and volume_ceiling = 66`)
  ).rows;
  const zoneCount = preview!.zones.length;
  console.log(
    [
      zoneCount,
      median(listTimes).toFixed(1),
      median(previewTimes).toFixed(0),
      `${(median(previewTimes) / zoneCount).toFixed(2)} ms`,
      (updateMs / 1000).toFixed(2),
      (updateMs / zonesToUpdate.length).toFixed(1),
      `${ok}/${zonesToUpdate.length}`,
      kept,
    ].join(" | "),
  );
}

await pool.end();
