CREATE TABLE "column_maps" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"platform_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"map" jsonb NOT NULL,
	"note" text,
	"upload_id" uuid,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "column_maps_platform_revision_key" UNIQUE("platform_id","revision"),
	CONSTRAINT "column_maps_revision_check" CHECK ("column_maps"."revision" >= 1)
);
--> statement-breakpoint
CREATE TABLE "upload_inspections" (
	"upload_id" uuid PRIMARY KEY NOT NULL,
	"encoding" text NOT NULL,
	"dialect" jsonb NOT NULL,
	"status" text DEFAULT 'checking' NOT NULL,
	"data_line_count" bigint,
	"findings" jsonb,
	"checked_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "upload_inspections_status_check" CHECK ("upload_inspections"."status" in ('checking', 'ok', 'warnings', 'unusable')),
	CONSTRAINT "upload_inspections_encoding_check" CHECK ("upload_inspections"."encoding" in ('utf-8', 'utf-8-bom'))
);
--> statement-breakpoint
ALTER TABLE "column_maps" ADD CONSTRAINT "column_maps_platform_id_platforms_id_fk" FOREIGN KEY ("platform_id") REFERENCES "public"."platforms"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "column_maps" ADD CONSTRAINT "column_maps_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "column_maps" ADD CONSTRAINT "column_maps_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "upload_inspections" ADD CONSTRAINT "upload_inspections_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "upload_inspections_status_idx" ON "upload_inspections" USING btree ("status");