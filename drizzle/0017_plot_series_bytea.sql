-- plot_series keeps its bucket arrays as bytea, each element big-endian as PostgreSQL's send functions write it
-- (float4 for min, max and mean; int4 for n; int2 for worst_flag): server/db/plot-arrays.ts. A build's COPY of a
-- month of minute buckets was ~10 M array elements, each received through its own function call.
CREATE FUNCTION plot_bytes(a real[]) RETURNS bytea LANGUAGE sql IMMUTABLE AS $$
  SELECT coalesce(string_agg(float4send(x), ''::bytea ORDER BY i), ''::bytea) FROM unnest(a) WITH ORDINALITY AS u(x, i)
$$;--> statement-breakpoint
CREATE FUNCTION plot_bytes(a integer[]) RETURNS bytea LANGUAGE sql IMMUTABLE AS $$
  SELECT coalesce(string_agg(int4send(x), ''::bytea ORDER BY i), ''::bytea) FROM unnest(a) WITH ORDINALITY AS u(x, i)
$$;--> statement-breakpoint
CREATE FUNCTION plot_bytes(a smallint[]) RETURNS bytea LANGUAGE sql IMMUTABLE AS $$
  SELECT coalesce(string_agg(int2send(x), ''::bytea ORDER BY i), ''::bytea) FROM unnest(a) WITH ORDINALITY AS u(x, i)
$$;--> statement-breakpoint
ALTER TABLE "plot_series" ALTER COLUMN "min" TYPE bytea USING plot_bytes("min");--> statement-breakpoint
ALTER TABLE "plot_series" ALTER COLUMN "max" TYPE bytea USING plot_bytes("max");--> statement-breakpoint
ALTER TABLE "plot_series" ALTER COLUMN "mean" TYPE bytea USING plot_bytes("mean");--> statement-breakpoint
ALTER TABLE "plot_series" ALTER COLUMN "n" TYPE bytea USING plot_bytes("n");--> statement-breakpoint
ALTER TABLE "plot_series" ALTER COLUMN "worst_flag" TYPE bytea USING plot_bytes("worst_flag");--> statement-breakpoint
DROP FUNCTION plot_bytes(real[]);--> statement-breakpoint
DROP FUNCTION plot_bytes(integer[]);--> statement-breakpoint
DROP FUNCTION plot_bytes(smallint[]);
