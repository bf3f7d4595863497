CREATE TABLE "custom_values" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "custom_values_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"resource" text NOT NULL,
	"row_key" text NOT NULL,
	"values" jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "custom_values" ADD CONSTRAINT "custom_values_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "custom_values_row_uq" ON "custom_values" USING btree ("version_id","resource","row_key");