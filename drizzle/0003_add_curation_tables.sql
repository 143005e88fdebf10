CREATE TYPE "public"."notification_kind" AS ENUM('version_submitted', 'version_approved', 'version_rejected', 'changes_requested', 'version_released', 'release_retracted', 'comment_added');--> statement-breakpoint
CREATE TYPE "public"."review_decision" AS ENUM('approved', 'rejected', 'changes_requested');--> statement-breakpoint
CREATE TABLE "dataset_follows" (
	"dataset_id" uuid NOT NULL,
	"user_id" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "dataset_follows_dataset_id_user_id_pk" PRIMARY KEY("dataset_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "notifications" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" text NOT NULL,
	"kind" "notification_kind" NOT NULL,
	"title" text NOT NULL,
	"body" text NOT NULL,
	"link" text NOT NULL,
	"version_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"read_at" timestamp with time zone,
	CONSTRAINT "notifications_link_check" CHECK ("notifications"."link" like '/%')
);
--> statement-breakpoint
CREATE TABLE "release_files" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"release_id" uuid NOT NULL,
	"format" text NOT NULL,
	"name" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"sha256" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "release_files_release_name_key" UNIQUE("release_id","name"),
	CONSTRAINT "release_files_size_check" CHECK ("release_files"."size_bytes" >= 0),
	CONSTRAINT "release_files_sha256_check" CHECK ("release_files"."sha256" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
CREATE TABLE "releases" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"dataset_id" uuid NOT NULL,
	"release_number" integer NOT NULL,
	"version_number" integer NOT NULL,
	"released_at" timestamp with time zone DEFAULT now() NOT NULL,
	"released_by" text,
	"project_name" text NOT NULL,
	"dataset_title" text NOT NULL,
	"authors" text[] NOT NULL,
	"citation" text NOT NULL,
	"stable_url" text NOT NULL,
	"licence" text NOT NULL,
	"notes" text,
	"retracted_at" timestamp with time zone,
	"retracted_by" text,
	"retraction_reason" text,
	CONSTRAINT "releases_version_key" UNIQUE("version_id"),
	CONSTRAINT "releases_dataset_number_key" UNIQUE("dataset_id","release_number"),
	CONSTRAINT "releases_number_check" CHECK ("releases"."release_number" >= 1),
	CONSTRAINT "releases_authors_check" CHECK (cardinality("releases"."authors") >= 1),
	CONSTRAINT "releases_retraction_check" CHECK (("releases"."retracted_at" is null and "releases"."retraction_reason" is null) or ("releases"."retracted_at" is not null and length(trim("releases"."retraction_reason")) >= 3))
);
--> statement-breakpoint
CREATE TABLE "reviews" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"reviewer_id" text,
	"decision" "review_decision" NOT NULL,
	"reason" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "reviews_reason_check" CHECK ("reviews"."decision" = 'approved' or length(trim("reviews"."reason")) >= 3)
);
--> statement-breakpoint
CREATE TABLE "version_comments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"author_id" text,
	"body" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "version_comments_body_check" CHECK (length(trim("version_comments"."body")) between 1 and 8000)
);
--> statement-breakpoint
ALTER TABLE "dataset_follows" ADD CONSTRAINT "dataset_follows_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "dataset_follows" ADD CONSTRAINT "dataset_follows_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notifications" ADD CONSTRAINT "notifications_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notifications" ADD CONSTRAINT "notifications_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "release_files" ADD CONSTRAINT "release_files_release_id_releases_id_fk" FOREIGN KEY ("release_id") REFERENCES "public"."releases"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "releases" ADD CONSTRAINT "releases_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "releases" ADD CONSTRAINT "releases_dataset_id_datasets_id_fk" FOREIGN KEY ("dataset_id") REFERENCES "public"."datasets"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "releases" ADD CONSTRAINT "releases_released_by_user_id_fk" FOREIGN KEY ("released_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "releases" ADD CONSTRAINT "releases_retracted_by_user_id_fk" FOREIGN KEY ("retracted_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_reviewer_id_user_id_fk" FOREIGN KEY ("reviewer_id") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "version_comments" ADD CONSTRAINT "version_comments_version_id_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "version_comments" ADD CONSTRAINT "version_comments_author_id_user_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "dataset_follows_user_idx" ON "dataset_follows" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "notifications_user_idx" ON "notifications" USING btree ("user_id","created_at");--> statement-breakpoint
CREATE INDEX "reviews_version_idx" ON "reviews" USING btree ("version_id");--> statement-breakpoint
CREATE INDEX "version_comments_version_idx" ON "version_comments" USING btree ("version_id","created_at");