CREATE TABLE "job_workers" (
	"worker_id" text PRIMARY KEY NOT NULL,
	"host" text NOT NULL,
	"pid" integer NOT NULL,
	"seen_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "rate_limit_hits" (
	"key" text PRIMARY KEY NOT NULL,
	"hits" integer NOT NULL,
	"reset_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
ALTER TABLE "outbox" ADD COLUMN "delivery_key" text;--> statement-breakpoint
ALTER TABLE "outbox" ADD COLUMN "delivered_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "outbox" ADD COLUMN "delivery_attempts" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
CREATE INDEX "rate_limit_hits_reset_at_idx" ON "rate_limit_hits" USING btree ("reset_at");--> statement-breakpoint
ALTER TABLE "outbox" ADD CONSTRAINT "outbox_delivery_key_unique" UNIQUE("delivery_key");--> statement-breakpoint
-- Messages recorded before delivery was tracked were handed to the transport when they were written.
UPDATE "outbox" SET "delivered_at" = "created_at";
