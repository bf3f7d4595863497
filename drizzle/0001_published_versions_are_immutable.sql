-- Custom SQL migration file, put your code below! ---- A published or withdrawn version never changes: its own row only gains a withdrawal or a DOI, and no row of
-- its data may be inserted, updated or deleted. Code enforces the same rules; this is the last line of defence.
CREATE OR REPLACE FUNCTION plotbank_guard_version() RETURNS trigger AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.state IN ('published', 'withdrawn') THEN
      RAISE EXCEPTION 'version % (%) is %, and a published version cannot be deleted', OLD.id, OLD.semver, OLD.state
        USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state IN ('published', 'withdrawn') THEN
    IF NEW.dataset_id IS DISTINCT FROM OLD.dataset_id OR NEW.semver IS DISTINCT FROM OLD.semver
       OR NEW.changelog IS DISTINCT FROM OLD.changelog OR NEW.table_schema IS DISTINCT FROM OLD.table_schema
       OR NEW.metadata_snapshot IS DISTINCT FROM OLD.metadata_snapshot OR NEW.checksum IS DISTINCT FROM OLD.checksum
       OR NEW.published_at IS DISTINCT FROM OLD.published_at OR NEW.created_by IS DISTINCT FROM OLD.created_by
       OR NEW.reviewed_by IS DISTINCT FROM OLD.reviewed_by OR NEW.based_on_version_id IS DISTINCT FROM OLD.based_on_version_id
       OR (OLD.state = 'withdrawn' AND NEW.state <> 'withdrawn')
       OR (OLD.state = 'published' AND NEW.state NOT IN ('published', 'withdrawn')) THEN
      RAISE EXCEPTION 'version % (%) is % and cannot be changed; only a withdrawal or its DOI may be recorded', OLD.id, OLD.semver, OLD.state
        USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
    END IF;
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER versions_immutable BEFORE UPDATE OR DELETE ON versions FOR EACH ROW EXECUTE FUNCTION plotbank_guard_version();
--> statement-breakpoint
-- Statement-level triggers with transition tables: one set-based check per statement, so a 1,000,000-row import
-- into a draft pays one join rather than a million function calls.
CREATE OR REPLACE FUNCTION plotbank_guard_new_rows() RETURNS trigger AS $$
DECLARE locked record;
BEGIN
  SELECT v.id, v.semver, v.state INTO locked FROM versions v WHERE v.state <> 'draft' AND v.id IN (SELECT DISTINCT version_id FROM new_rows) LIMIT 1;
  IF FOUND THEN
    RAISE EXCEPTION 'version % (%) is %; its % cannot change', locked.id, locked.semver, locked.state, TG_TABLE_NAME
      USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
  END IF;
  RETURN NULL;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION plotbank_guard_old_rows() RETURNS trigger AS $$
DECLARE locked record;
BEGIN
  SELECT v.id, v.semver, v.state INTO locked FROM versions v WHERE v.state <> 'draft' AND v.id IN (SELECT DISTINCT version_id FROM old_rows) LIMIT 1;
  IF FOUND THEN
    RAISE EXCEPTION 'version % (%) is %; its % cannot change', locked.id, locked.semver, locked.state, TG_TABLE_NAME
      USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
  END IF;
  RETURN NULL;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER sites_guard_insert AFTER INSERT ON sites REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER sites_guard_update_old AFTER UPDATE ON sites REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER sites_guard_update_new AFTER UPDATE ON sites REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER sites_guard_delete AFTER DELETE ON sites REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER site_years_guard_insert AFTER INSERT ON site_years REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER site_years_guard_update_old AFTER UPDATE ON site_years REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER site_years_guard_update_new AFTER UPDATE ON site_years REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER site_years_guard_delete AFTER DELETE ON site_years REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER soil_tests_guard_insert AFTER INSERT ON soil_tests REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER soil_tests_guard_update_old AFTER UPDATE ON soil_tests REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER soil_tests_guard_update_new AFTER UPDATE ON soil_tests REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER soil_tests_guard_delete AFTER DELETE ON soil_tests REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER treatments_guard_insert AFTER INSERT ON treatments REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER treatments_guard_update_old AFTER UPDATE ON treatments REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER treatments_guard_update_new AFTER UPDATE ON treatments REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER treatments_guard_delete AFTER DELETE ON treatments REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER applications_guard_insert AFTER INSERT ON applications REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER applications_guard_update_old AFTER UPDATE ON applications REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER applications_guard_update_new AFTER UPDATE ON applications REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER applications_guard_delete AFTER DELETE ON applications REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER plots_guard_insert AFTER INSERT ON plots REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER plots_guard_update_old AFTER UPDATE ON plots REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER plots_guard_update_new AFTER UPDATE ON plots REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER plots_guard_delete AFTER DELETE ON plots REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER summary_means_guard_insert AFTER INSERT ON summary_means REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER summary_means_guard_update_old AFTER UPDATE ON summary_means REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER summary_means_guard_update_new AFTER UPDATE ON summary_means REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER summary_means_guard_delete AFTER DELETE ON summary_means REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER responses_guard_insert AFTER INSERT ON responses REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER responses_guard_update_old AFTER UPDATE ON responses REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER responses_guard_update_new AFTER UPDATE ON responses REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER responses_guard_delete AFTER DELETE ON responses REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER uploads_guard_insert AFTER INSERT ON uploads REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER uploads_guard_update_old AFTER UPDATE ON uploads REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
--> statement-breakpoint
CREATE TRIGGER uploads_guard_update_new AFTER UPDATE ON uploads REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_new_rows();
--> statement-breakpoint
CREATE TRIGGER uploads_guard_delete AFTER DELETE ON uploads REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_old_rows();
