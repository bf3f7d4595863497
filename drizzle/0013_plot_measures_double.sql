-- float4 → float8 through text, so a stored 13.1 stays 13.1 (a plain cast would give 13.100000381469727).
ALTER TABLE "plots" ALTER COLUMN "harvest_moisture_pct" SET DATA TYPE double precision USING "harvest_moisture_pct"::text::double precision;--> statement-breakpoint
ALTER TABLE "plots" ALTER COLUMN "stand_count" SET DATA TYPE double precision USING "stand_count"::text::double precision;--> statement-breakpoint
ALTER TABLE "plots" ALTER COLUMN "vigour" SET DATA TYPE double precision USING "vigour"::text::double precision;--> statement-breakpoint
ALTER TABLE "plots" ALTER COLUMN "test_weight" SET DATA TYPE double precision USING "test_weight"::text::double precision;