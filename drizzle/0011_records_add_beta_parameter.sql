ALTER TABLE "records" ADD COLUMN "beta_parameter" double precision;--> statement-breakpoint
ALTER TABLE "records" ADD COLUMN "beta_parameter_qc" smallint;