CREATE TYPE "public"."doi_status" AS ENUM('none', 'pending', 'registered', 'failed');--> statement-breakpoint
CREATE TYPE "public"."email_token_purpose" AS ENUM('verify', 'reset', 'invite');--> statement-breakpoint
CREATE TYPE "public"."role" AS ENUM('member', 'curator', 'reviewer', 'admin');--> statement-breakpoint
CREATE TYPE "public"."token_scope" AS ENUM('read', 'write');--> statement-breakpoint
CREATE TYPE "public"."version_state" AS ENUM('draft', 'in_review', 'published', 'withdrawn');--> statement-breakpoint
CREATE TABLE "api_tokens" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"name" text NOT NULL,
	"prefix" text NOT NULL,
	"token_hash" text NOT NULL,
	"scope" "token_scope" DEFAULT 'read' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone,
	"last_used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "api_tokens_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "email_tokens" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"purpose" "email_token_purpose" NOT NULL,
	"email" text NOT NULL,
	"user_id" uuid,
	"token_hash" text NOT NULL,
	"role" "role",
	"invited_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	CONSTRAINT "email_tokens_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"kind" text NOT NULL,
	"to" text NOT NULL,
	"subject" text NOT NULL,
	"text" text NOT NULL,
	"html" text,
	"meta" jsonb,
	"transport" text DEFAULT 'outbox' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "role_changes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"actor_id" uuid,
	"user_id" uuid NOT NULL,
	"from_role" "role" NOT NULL,
	"to_role" "role" NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "saved_queries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"name" text NOT NULL,
	"query" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"token_hash" text PRIMARY KEY NOT NULL,
	"user_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"display_name" text NOT NULL,
	"password_hash" text,
	"role" "role" DEFAULT 'member' NOT NULL,
	"email_verified_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"disabled_at" timestamp with time zone,
	CONSTRAINT "users_email_unique" UNIQUE("email")
);
--> statement-breakpoint
CREATE TABLE "dataset_editors" (
	"dataset_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	CONSTRAINT "dataset_editors_dataset_id_user_id_pk" PRIMARY KEY("dataset_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "datasets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"slug" text NOT NULL,
	"title" text NOT NULL,
	"crops" text[] NOT NULL,
	"region" text NOT NULL,
	"description" text NOT NULL,
	"licence" text DEFAULT 'CC-BY-4.0' NOT NULL,
	"keywords" text[] DEFAULT '{}' NOT NULL,
	"contributors" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"funding" text,
	"methods" text,
	"owner_id" uuid NOT NULL,
	"concept_doi" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "datasets_slug_unique" UNIQUE("slug")
);
--> statement-breakpoint
CREATE TABLE "follows" (
	"dataset_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "follows_dataset_id_user_id_pk" PRIMARY KEY("dataset_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"resource" text NOT NULL,
	"filename" text NOT NULL,
	"byte_size" bigint NOT NULL,
	"sha256" text NOT NULL,
	"row_count" integer NOT NULL,
	"options" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"content" text NOT NULL,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "validation_reports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"resource" text NOT NULL,
	"filename" text NOT NULL,
	"accepted" boolean NOT NULL,
	"problems" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"dataset_id" uuid NOT NULL,
	"semver" text NOT NULL,
	"state" "version_state" DEFAULT 'draft' NOT NULL,
	"changelog" text DEFAULT '' NOT NULL,
	"table_schema" jsonb NOT NULL,
	"metadata_snapshot" jsonb,
	"checksum" text,
	"based_on_version_id" uuid,
	"created_by" uuid NOT NULL,
	"submitted_by" uuid,
	"reviewed_by" uuid,
	"review_comment" text,
	"withdrawn_reason" text,
	"doi" text,
	"doi_status" "doi_status" DEFAULT 'none' NOT NULL,
	"doi_attempts" integer DEFAULT 0 NOT NULL,
	"doi_last_error" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_at" timestamp with time zone,
	"published_at" timestamp with time zone,
	"withdrawn_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "applications" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "applications_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"treatment_id" bigint NOT NULL,
	"product" text NOT NULL,
	"grade" text NOT NULL,
	"product_rate" double precision NOT NULL,
	"rate_unit" text NOT NULL,
	"placement" text NOT NULL,
	"timing" text NOT NULL,
	"n_lb_ac" double precision NOT NULL,
	"p2o5_lb_ac" double precision NOT NULL,
	"k2o_lb_ac" double precision NOT NULL,
	"s_lb_ac" double precision NOT NULL
);
--> statement-breakpoint
CREATE TABLE "plots" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "plots_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"site_year_id" bigint NOT NULL,
	"treatment_id" bigint NOT NULL,
	"plot" text NOT NULL,
	"block" smallint NOT NULL,
	"yield_kg_ha" double precision,
	"harvest_moisture_pct" real,
	"stand_count" real,
	"vigour" real,
	"test_weight" real
);
--> statement-breakpoint
CREATE TABLE "responses" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "responses_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"site_year_id" bigint NOT NULL,
	"treatment_id" bigint NOT NULL,
	"check_treatment_id" bigint NOT NULL,
	"site_code" text NOT NULL,
	"site_year_code" text NOT NULL,
	"treatment_code" text NOT NULL,
	"crop" text NOT NULL,
	"year" smallint NOT NULL,
	"tillage" text,
	"row_spacing_in" real,
	"planting_date" date,
	"nutrients" text[] NOT NULL,
	"placements" text[] NOT NULL,
	"n_lb_ac" double precision NOT NULL,
	"p2o5_lb_ac" double precision NOT NULL,
	"k2o_lb_ac" double precision NOT NULL,
	"s_lb_ac" double precision NOT NULL,
	"soil_p_class" text,
	"soil_p_value" double precision,
	"soil_k_class" text,
	"soil_k_value" double precision,
	"soil_s_class" text,
	"soil_s_value" double precision,
	"check_mean_kg_ha" double precision NOT NULL,
	"treated_mean_kg_ha" double precision NOT NULL,
	"md_kg_ha" double precision NOT NULL,
	"se_kg_ha" double precision NOT NULL,
	"df_error" integer NOT NULL,
	"lnrr" double precision,
	"lnrr_var" double precision,
	"p_value" double precision,
	"lsd05_kg_ha" double precision,
	"cv_pct" double precision,
	"replicates" smallint NOT NULL,
	"balanced" boolean NOT NULL,
	"from_summary" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "site_years" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "site_years_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"site_id" bigint NOT NULL,
	"code" text NOT NULL,
	"crop" text NOT NULL,
	"year" smallint NOT NULL,
	"design" text DEFAULT 'RCBD' NOT NULL,
	"blocks" smallint NOT NULL,
	"tillage" text,
	"previous_crop" text,
	"planting_date" date,
	"row_spacing_in" real,
	"variety" text,
	"maturity_group" text
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "sites_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"code" text NOT NULL,
	"location" text NOT NULL,
	"soil_series" text,
	"soil_texture" text
);
--> statement-breakpoint
CREATE TABLE "soil_tests" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "soil_tests_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"site_year_id" bigint NOT NULL,
	"analyte" text NOT NULL,
	"value" double precision NOT NULL,
	"unit" text NOT NULL,
	"extractant" text,
	"depth_in" real,
	"class" text,
	"interpretation" text
);
--> statement-breakpoint
CREATE TABLE "summary_means" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "summary_means_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"site_year_id" bigint NOT NULL,
	"treatment_id" bigint NOT NULL,
	"mean_kg_ha" double precision NOT NULL,
	"replicates" smallint NOT NULL,
	"mse" double precision NOT NULL,
	"df_error" integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE "treatments" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "treatments_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"version_id" uuid NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"is_check" boolean DEFAULT false NOT NULL,
	"n_lb_ac" double precision DEFAULT 0 NOT NULL,
	"p2o5_lb_ac" double precision DEFAULT 0 NOT NULL,
	"k2o_lb_ac" double precision DEFAULT 0 NOT NULL,
	"s_lb_ac" double precision DEFAULT 0 NOT NULL,
	"nutrients" text[] DEFAULT '{}'::text[] NOT NULL,
	"placements" text[] DEFAULT '{}'::text[] NOT NULL
);
--> statement-breakpoint
ALTER TABLE "api_tokens" ADD CONSTRAINT "api_tokens_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "email_tokens" ADD CONSTRAINT "email_tokens_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "email_tokens" ADD CONSTRAINT "email_tokens_invited_by_users_id_fk" FOREIGN KEY ("invited_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "role_changes" ADD CONSTRAINT "role_changes_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "role_changes" ADD CONSTRAINT "role_changes_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "saved_queries" ADD CONSTRAINT "saved_queries_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "dataset_editors" ADD CONSTRAINT "dataset_editors_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "dataset_editors" ADD CONSTRAINT "dataset_editors_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "datasets" ADD CONSTRAINT "datasets_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "follows" ADD CONSTRAINT "follows_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "follows" ADD CONSTRAINT "follows_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "validation_reports" ADD CONSTRAINT "validation_reports_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "versions" ADD CONSTRAINT "versions_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "versions" ADD CONSTRAINT "versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "versions" ADD CONSTRAINT "versions_submitted_by_users_id_fk" FOREIGN KEY ("submitted_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "versions" ADD CONSTRAINT "versions_reviewed_by_users_id_fk" FOREIGN KEY ("reviewed_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_treatment_id_treatments_id_fk" FOREIGN KEY ("treatment_id") REFERENCES "public"."treatments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plots" ADD CONSTRAINT "plots_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plots" ADD CONSTRAINT "plots_site_year_id_site_years_id_fk" FOREIGN KEY ("site_year_id") REFERENCES "public"."site_years"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plots" ADD CONSTRAINT "plots_treatment_id_treatments_id_fk" FOREIGN KEY ("treatment_id") REFERENCES "public"."treatments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "responses" ADD CONSTRAINT "responses_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "responses" ADD CONSTRAINT "responses_site_year_id_site_years_id_fk" FOREIGN KEY ("site_year_id") REFERENCES "public"."site_years"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "responses" ADD CONSTRAINT "responses_treatment_id_treatments_id_fk" FOREIGN KEY ("treatment_id") REFERENCES "public"."treatments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "responses" ADD CONSTRAINT "responses_check_treatment_id_treatments_id_fk" FOREIGN KEY ("check_treatment_id") REFERENCES "public"."treatments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "site_years" ADD CONSTRAINT "site_years_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "site_years" ADD CONSTRAINT "site_years_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "soil_tests" ADD CONSTRAINT "soil_tests_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "soil_tests" ADD CONSTRAINT "soil_tests_site_year_id_site_years_id_fk" FOREIGN KEY ("site_year_id") REFERENCES "public"."site_years"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summary_means" ADD CONSTRAINT "summary_means_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summary_means" ADD CONSTRAINT "summary_means_site_year_id_site_years_id_fk" FOREIGN KEY ("site_year_id") REFERENCES "public"."site_years"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "summary_means" ADD CONSTRAINT "summary_means_treatment_id_treatments_id_fk" FOREIGN KEY ("treatment_id") REFERENCES "public"."treatments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "treatments" ADD CONSTRAINT "treatments_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "api_tokens_user_idx" ON "api_tokens" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "email_tokens_email_idx" ON "email_tokens" USING btree ("email");--> statement-breakpoint
CREATE INDEX "sessions_user_idx" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "uploads_version_idx" ON "uploads" USING btree ("version_id");--> statement-breakpoint
CREATE INDEX "validation_reports_version_idx" ON "validation_reports" USING btree ("version_id");--> statement-breakpoint
CREATE UNIQUE INDEX "versions_dataset_semver_uq" ON "versions" USING btree ("dataset_id","semver");--> statement-breakpoint
CREATE INDEX "versions_dataset_state_idx" ON "versions" USING btree ("dataset_id","state");--> statement-breakpoint
CREATE INDEX "applications_treatment_idx" ON "applications" USING btree ("treatment_id");--> statement-breakpoint
CREATE UNIQUE INDEX "plots_site_year_plot_uq" ON "plots" USING btree ("site_year_id","plot");--> statement-breakpoint
CREATE INDEX "plots_version_idx" ON "plots" USING btree ("version_id","site_year_id");--> statement-breakpoint
CREATE UNIQUE INDEX "responses_site_year_treatment_uq" ON "responses" USING btree ("site_year_id","treatment_id");--> statement-breakpoint
CREATE INDEX "responses_version_idx" ON "responses" USING btree ("version_id");--> statement-breakpoint
CREATE INDEX "responses_filter_idx" ON "responses" USING btree ("version_id","crop","year");--> statement-breakpoint
CREATE INDEX "responses_nutrients_gin" ON "responses" USING gin ("nutrients");--> statement-breakpoint
CREATE INDEX "responses_placements_gin" ON "responses" USING gin ("placements");--> statement-breakpoint
CREATE UNIQUE INDEX "site_years_version_code_uq" ON "site_years" USING btree ("version_id","code");--> statement-breakpoint
CREATE INDEX "site_years_site_idx" ON "site_years" USING btree ("site_id");--> statement-breakpoint
CREATE UNIQUE INDEX "sites_version_code_uq" ON "sites" USING btree ("version_id","code");--> statement-breakpoint
CREATE UNIQUE INDEX "soil_tests_site_year_analyte_uq" ON "soil_tests" USING btree ("site_year_id","analyte");--> statement-breakpoint
CREATE UNIQUE INDEX "summary_means_site_year_treatment_uq" ON "summary_means" USING btree ("site_year_id","treatment_id");--> statement-breakpoint
CREATE UNIQUE INDEX "treatments_version_code_uq" ON "treatments" USING btree ("version_id","code");