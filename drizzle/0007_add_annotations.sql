CREATE TABLE "annotations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"dataset_id" uuid NOT NULL,
	"version_id" uuid,
	"platform" text,
	"start_time" timestamp with time zone NOT NULL,
	"end_time" timestamp with time zone NOT NULL,
	"variables" text[] NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"flag" smallint,
	"reason" text,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_by" text,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "annotations_range_check" CHECK ("annotations"."end_time" >= "annotations"."start_time"),
	CONSTRAINT "annotations_variables_check" CHECK (cardinality("annotations"."variables") >= 1),
	CONSTRAINT "annotations_flag_check" CHECK ("annotations"."flag" is null or "annotations"."flag" in (1, 3, 4)),
	CONSTRAINT "annotations_reason_check" CHECK ("annotations"."flag" is null or length(btrim(coalesce("annotations"."reason", ''))) >= 3)
);
--> statement-breakpoint
CREATE TABLE "manual_flag_originals" (
	"dataset_id" uuid NOT NULL,
	"version_number" integer NOT NULL,
	"platform" text NOT NULL,
	"time" timestamp with time zone NOT NULL,
	"variable" text NOT NULL,
	"flag" smallint NOT NULL,
	CONSTRAINT "manual_flag_originals_pkey" PRIMARY KEY("dataset_id","platform","variable","time","version_number")
);
--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "annotations" ADD CONSTRAINT "annotations_updated_by_user_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "manual_flag_originals" ADD CONSTRAINT "manual_flag_originals_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "annotations_dataset_time_idx" ON "annotations" USING btree ("dataset_id","start_time");