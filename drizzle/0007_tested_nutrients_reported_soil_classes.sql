ALTER TABLE "responses" ADD COLUMN "tested_nutrients_stated" text[];--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_p_reported_class" text;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_p_scheme" text;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_k_reported_class" text;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_k_scheme" text;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_s_reported_class" text;--> statement-breakpoint
ALTER TABLE "responses" ADD COLUMN "soil_s_scheme" text;--> statement-breakpoint
ALTER TABLE "soil_tests" ADD COLUMN "reported_class" text;--> statement-breakpoint
ALTER TABLE "treatments" ADD COLUMN "tested_nutrients_stated" text[];