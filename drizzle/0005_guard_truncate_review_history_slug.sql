-- Custom SQL migration file, put your code below! --
-- Three holes in the immutability guards of 0001, closed in the database itself.
--
-- 1. TRUNCATE fires no row or statement trigger of INSERT/UPDATE/DELETE, so `TRUNCATE plots CASCADE` emptied
--    published versions. A statement-level BEFORE TRUNCATE trigger on every table holding version content refuses
--    it while any version is in review, published or withdrawn (TRUNCATE cannot be limited to drafts).
CREATE OR REPLACE FUNCTION plotbank_guard_truncate() RETURNS trigger AS $$
DECLARE locked record;
BEGIN
  SELECT v.id, v.semver, v.state INTO locked FROM versions v WHERE v.state <> 'draft' LIMIT 1;
  IF FOUND THEN
    RAISE EXCEPTION 'TRUNCATE of % would delete rows of version % (%), which is %', TG_TABLE_NAME, locked.id, locked.semver, locked.state
      USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
  END IF;
  RETURN NULL;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER sites_guard_truncate BEFORE TRUNCATE ON sites FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER site_years_guard_truncate BEFORE TRUNCATE ON site_years FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER soil_tests_guard_truncate BEFORE TRUNCATE ON soil_tests FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER treatments_guard_truncate BEFORE TRUNCATE ON treatments FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER applications_guard_truncate BEFORE TRUNCATE ON applications FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER plots_guard_truncate BEFORE TRUNCATE ON plots FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER summary_means_guard_truncate BEFORE TRUNCATE ON summary_means FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER responses_guard_truncate BEFORE TRUNCATE ON responses FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER uploads_guard_truncate BEFORE TRUNCATE ON uploads FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER versions_guard_truncate BEFORE TRUNCATE ON versions FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER datasets_guard_truncate BEFORE TRUNCATE ON datasets FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER validation_reports_guard_truncate BEFORE TRUNCATE ON validation_reports FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
CREATE TRIGGER version_edits_guard_truncate BEFORE TRUNCATE ON version_edits FOR EACH STATEMENT EXECUTE FUNCTION plotbank_guard_truncate();
--> statement-breakpoint
-- 2. The review history of a released version (who created, submitted and reviewed it, when, and the reviewer's
--    comment) is part of its record; once withdrawn, the withdrawal is too. 0001 left submitted_by, submitted_at,
--    review_comment and created_at open.
CREATE OR REPLACE FUNCTION plotbank_guard_review_history() RETURNS trigger AS $$
BEGIN
  IF OLD.state IN ('published', 'withdrawn') THEN
    IF NEW.submitted_by IS DISTINCT FROM OLD.submitted_by OR NEW.submitted_at IS DISTINCT FROM OLD.submitted_at
       OR NEW.review_comment IS DISTINCT FROM OLD.review_comment OR NEW.created_at IS DISTINCT FROM OLD.created_at
       OR (OLD.state = 'withdrawn' AND (NEW.withdrawn_reason IS DISTINCT FROM OLD.withdrawn_reason OR NEW.withdrawn_at IS DISTINCT FROM OLD.withdrawn_at)) THEN
      RAISE EXCEPTION 'version % (%) is %; its review history cannot be rewritten', OLD.id, OLD.semver, OLD.state
        USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
    END IF;
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER versions_review_history_immutable BEFORE UPDATE ON versions FOR EACH ROW EXECUTE FUNCTION plotbank_guard_review_history();
--> statement-breakpoint
-- 3. A DOI resolves to a landing page and download URLs built on the dataset's slug: once the dataset has a concept
--    DOI or any version has a DOI, the slug is fixed.
CREATE OR REPLACE FUNCTION plotbank_guard_dataset_slug() RETURNS trigger AS $$
BEGIN
  IF NEW.slug IS DISTINCT FROM OLD.slug
     AND (OLD.concept_doi IS NOT NULL OR EXISTS (SELECT 1 FROM versions v WHERE v.dataset_id = OLD.id AND v.doi IS NOT NULL)) THEN
    RAISE EXCEPTION 'dataset % has a DOI, so its slug "%" cannot change', OLD.id, OLD.slug
      USING ERRCODE = 'P0001', HINT = 'plotbank:immutable';
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER datasets_slug_fixed_by_doi BEFORE UPDATE ON datasets FOR EACH ROW EXECUTE FUNCTION plotbank_guard_dataset_slug();
