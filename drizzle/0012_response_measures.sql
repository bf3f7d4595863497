DROP INDEX "responses_site_year_treatment_uq";--> statement-breakpoint
ALTER TABLE "plots" ADD COLUMN "other_measures" jsonb;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "measure" text DEFAULT 'yield' NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX "responses_site_year_treatment_measure_uq" ON "responses" USING btree ("site_year_id","treatment_id","measure");