CREATE TABLE "request_limits" (
	"key" text PRIMARY KEY NOT NULL,
	"hits" integer NOT NULL,
	"reset_at" timestamp with time zone NOT NULL,
	CONSTRAINT "request_limits_hits_check" CHECK ("request_limits"."hits" >= 0)
);
--> statement-breakpoint
CREATE INDEX "request_limits_reset_at_idx" ON "request_limits" USING btree ("reset_at");