CREATE TABLE "version_edits" (
	"version_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"last_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "version_edits_version_id_user_id_pk" PRIMARY KEY("version_id","user_id")
);
--> statement-breakpoint
ALTER TABLE "version_edits" ADD CONSTRAINT "version_edits_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "version_edits" ADD CONSTRAINT "version_edits_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;