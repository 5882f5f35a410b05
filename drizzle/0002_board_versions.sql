CREATE TABLE "library_versions" (
	"organization_id" text PRIMARY KEY NOT NULL,
	"curves" bigint DEFAULT 0 NOT NULL
);
--> statement-breakpoint
ALTER TABLE "homes" ADD COLUMN "board_version" bigint DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "library_versions" ADD CONSTRAINT "library_versions_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "audit_events_zone_created_idx" ON "audit_events" USING btree ("zone_id","created_at");--> statement-breakpoint
CREATE INDEX "audit_events_actor_created_idx" ON "audit_events" USING btree ("organization_id","actor_user_id","created_at");--> statement-breakpoint
-- The zone board's version stamps. homes.board_version moves whenever anything
-- the board of that home shows changes; library_versions.curves whenever the
-- company's tone-curve library does. Statement-level triggers with transition
-- tables: a statement that reorders forty cards bumps its home once.
CREATE FUNCTION zw_bump_homes(home_ids uuid[]) RETURNS void LANGUAGE sql AS $$
  UPDATE homes SET board_version = board_version + 1
  WHERE id IN (SELECT DISTINCT unnest(home_ids)) AND id IS NOT NULL;
$$;
--> statement-breakpoint
CREATE FUNCTION zw_board_by_home() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM zw_bump_homes(ARRAY(SELECT home_id FROM new_rows));
  ELSIF TG_OP = 'UPDATE' THEN
    PERFORM zw_bump_homes(ARRAY(SELECT home_id FROM new_rows UNION SELECT home_id FROM old_rows));
  ELSE
    PERFORM zw_bump_homes(ARRAY(SELECT home_id FROM old_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION zw_board_by_zone() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM zw_bump_homes(ARRAY(SELECT z.home_id FROM zones z WHERE z.id IN (SELECT zone_id FROM new_rows)));
  ELSIF TG_OP = 'UPDATE' THEN
    PERFORM zw_bump_homes(ARRAY(SELECT z.home_id FROM zones z WHERE z.id IN (SELECT zone_id FROM new_rows UNION SELECT zone_id FROM old_rows)));
  ELSE
    PERFORM zw_bump_homes(ARRAY(SELECT z.home_id FROM zones z WHERE z.id IN (SELECT zone_id FROM old_rows)));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
-- A device shows on the board of its home and of any zone bound to it.
CREATE FUNCTION zw_board_by_device() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM zw_bump_homes(ARRAY(SELECT home_id FROM new_rows));
  ELSIF TG_OP = 'UPDATE' THEN
    PERFORM zw_bump_homes(ARRAY(
      SELECT home_id FROM new_rows UNION SELECT home_id FROM old_rows
      UNION SELECT z.home_id FROM zones z WHERE z.device_id IN (SELECT id FROM new_rows)));
  ELSE
    PERFORM zw_bump_homes(ARRAY(SELECT home_id FROM old_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION zw_bump_library(org_ids text[]) RETURNS void LANGUAGE sql AS $$
  INSERT INTO library_versions (organization_id, curves)
  SELECT DISTINCT o, 1 FROM unnest(org_ids) o
  WHERE o IS NOT NULL AND EXISTS (SELECT 1 FROM organization WHERE id = o)
  ON CONFLICT (organization_id) DO UPDATE SET curves = library_versions.curves + 1;
$$;
--> statement-breakpoint
CREATE FUNCTION zw_library_by_org() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM zw_bump_library(ARRAY(SELECT organization_id FROM new_rows));
  ELSIF TG_OP = 'UPDATE' THEN
    PERFORM zw_bump_library(ARRAY(SELECT organization_id FROM new_rows UNION SELECT organization_id FROM old_rows));
  ELSE
    PERFORM zw_bump_library(ARRAY(SELECT organization_id FROM old_rows));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION zw_library_by_curve() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'INSERT' THEN
    PERFORM zw_bump_library(ARRAY(SELECT c.organization_id FROM tone_curves c WHERE c.id IN (SELECT curve_id FROM new_rows)));
  ELSIF TG_OP = 'UPDATE' THEN
    PERFORM zw_bump_library(ARRAY(SELECT c.organization_id FROM tone_curves c WHERE c.id IN (SELECT curve_id FROM new_rows UNION SELECT curve_id FROM old_rows)));
  ELSE
    PERFORM zw_bump_library(ARRAY(SELECT c.organization_id FROM tone_curves c WHERE c.id IN (SELECT curve_id FROM old_rows)));
  END IF;
  RETURN NULL;
END $$;
--> statement-breakpoint
-- A lock holder's name and a model profile show on boards too; both change rarely.
CREATE FUNCTION zw_board_by_user() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM zw_bump_homes(ARRAY(
    SELECT z.home_id FROM zones z WHERE z.locked_by IN (SELECT n.id FROM new_rows n JOIN old_rows o ON o.id = n.id WHERE n.name IS DISTINCT FROM o.name)));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE FUNCTION zw_board_by_profile() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM zw_bump_homes(ARRAY(
    SELECT z.home_id FROM zones z JOIN devices d ON d.id = z.device_id WHERE d.model_profile_id IN (SELECT id FROM new_rows)));
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER zones_board_ins AFTER INSERT ON zones REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_home();--> statement-breakpoint
CREATE TRIGGER zones_board_upd AFTER UPDATE ON zones REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_home();--> statement-breakpoint
CREATE TRIGGER zones_board_del AFTER DELETE ON zones REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_home();--> statement-breakpoint
CREATE TRIGGER sources_board_ins AFTER INSERT ON sources REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER sources_board_upd AFTER UPDATE ON sources REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER sources_board_del AFTER DELETE ON sources REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER stream_presets_board_ins AFTER INSERT ON stream_presets REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER stream_presets_board_upd AFTER UPDATE ON stream_presets REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER stream_presets_board_del AFTER DELETE ON stream_presets REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER level_match_clips_board_ins AFTER INSERT ON level_match_clips REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER level_match_clips_board_upd AFTER UPDATE ON level_match_clips REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER level_match_clips_board_del AFTER DELETE ON level_match_clips REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_zone();--> statement-breakpoint
CREATE TRIGGER devices_board_ins AFTER INSERT ON devices REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_device();--> statement-breakpoint
CREATE TRIGGER devices_board_upd AFTER UPDATE ON devices REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_device();--> statement-breakpoint
CREATE TRIGGER devices_board_del AFTER DELETE ON devices REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_device();--> statement-breakpoint
CREATE TRIGGER tone_curves_library_ins AFTER INSERT ON tone_curves REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_org();--> statement-breakpoint
CREATE TRIGGER tone_curves_library_upd AFTER UPDATE ON tone_curves REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_org();--> statement-breakpoint
CREATE TRIGGER tone_curves_library_del AFTER DELETE ON tone_curves REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_org();--> statement-breakpoint
CREATE TRIGGER tone_curve_bands_library_ins AFTER INSERT ON tone_curve_bands REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_curve();--> statement-breakpoint
CREATE TRIGGER tone_curve_bands_library_upd AFTER UPDATE ON tone_curve_bands REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_curve();--> statement-breakpoint
CREATE TRIGGER tone_curve_bands_library_del AFTER DELETE ON tone_curve_bands REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_library_by_curve();--> statement-breakpoint
CREATE TRIGGER user_board_upd AFTER UPDATE ON "user" REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_user();--> statement-breakpoint
CREATE TRIGGER model_profiles_board_upd AFTER UPDATE ON model_profiles REFERENCING NEW TABLE AS new_rows OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION zw_board_by_profile();
