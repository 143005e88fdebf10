-- Records keep every variable's QC flag in one bytea, "flags", a byte per variable in a fixed order
-- (server/db/record-flags.ts, FLAG_ORDER; 0 = the build had no such variable), instead of one smallint column per
-- variable. A build's COPY then hands PostgreSQL ~35 fields per row instead of ~65, each costing a conversion and
-- a length word. record_flag(flags, i) reads one flag back as a smallint, NULL where the byte is 0 or absent; it
-- is a plain SQL function, so the planner inlines it. The table is made again (as in 0013) and the rows copied
-- across with their flags packed.
CREATE FUNCTION record_flag(flags bytea, i integer) RETURNS smallint LANGUAGE sql IMMUTABLE PARALLEL SAFE
  RETURN CASE WHEN i < length(flags) THEN nullif(get_byte(flags, i), 0)::smallint END;--> statement-breakpoint
ALTER TABLE "records" RENAME TO "records_previous";--> statement-breakpoint
ALTER TABLE "records_previous" RENAME CONSTRAINT "records_pkey" TO "records_previous_pkey";--> statement-breakpoint
ALTER TABLE "records_previous" RENAME CONSTRAINT "records_valid_range_check" TO "records_previous_valid_range_check";--> statement-breakpoint
CREATE TABLE "records" (
	"dataset_id" uuid NOT NULL,
	"platform" text DEFAULT '' NOT NULL,
	"time" timestamp with time zone NOT NULL,
	"valid_from" integer NOT NULL,
	"valid_to" integer,
	"latitude" double precision,
	"longitude" double precision,
	"wind_speed" double precision,
	"wind_from_direction" double precision,
	"eastward_wind" double precision,
	"northward_wind" double precision,
	"wind_speed_of_gust" double precision,
	"air_temperature" double precision,
	"air_pressure" double precision,
	"air_pressure_at_mean_sea_level" double precision,
	"relative_humidity" double precision,
	"sea_surface_temperature" double precision,
	"sea_water_temperature" double precision,
	"sea_water_practical_salinity" double precision,
	"eastward_sea_water_velocity" double precision,
	"northward_sea_water_velocity" double precision,
	"sea_water_speed" double precision,
	"sea_water_velocity_to_direction" double precision,
	"wind_speed_10m_neutral" double precision,
	"eastward_wind_10m_neutral" double precision,
	"northward_wind_10m_neutral" double precision,
	"surface_drag_coefficient_for_momentum_in_air" double precision,
	"air_density" double precision,
	"surface_downward_eastward_stress" double precision,
	"surface_downward_northward_stress" double precision,
	"magnitude_of_surface_downward_stress" double precision,
	"coriolis_parameter" double precision,
	"beta_parameter" double precision,
	"ekman_transport_eastward" double precision,
	"ekman_transport_northward" double precision,
	"ekman_depth_empirical" double precision,
	"ekman_depth_theoretical" double precision,
	"eastward_sea_water_velocity_due_to_ekman_drift" double precision,
	"northward_sea_water_velocity_due_to_ekman_drift" double precision,
	"coastal_upwelling_index" double precision,
	"surface_eastward_sea_water_velocity" double precision,
	"surface_northward_sea_water_velocity" double precision,
	"platform_speed_wrt_ground" double precision,
	"current_wind_angle" double precision,
	"current_wind_ratio" double precision,
	"flags" bytea NOT NULL,
	CONSTRAINT "records_pkey" PRIMARY KEY("dataset_id","platform","time","valid_from"),
	CONSTRAINT "records_valid_range_check" CHECK ("records"."valid_to" is null or "records"."valid_to" > "records"."valid_from")
);--> statement-breakpoint
INSERT INTO "records" ("dataset_id", "platform", "time", "valid_from", "valid_to", "latitude", "longitude", "wind_speed", "wind_from_direction", "eastward_wind", "northward_wind", "wind_speed_of_gust", "air_temperature", "air_pressure", "air_pressure_at_mean_sea_level", "relative_humidity", "sea_surface_temperature", "sea_water_temperature", "sea_water_practical_salinity", "eastward_sea_water_velocity", "northward_sea_water_velocity", "sea_water_speed", "sea_water_velocity_to_direction", "wind_speed_10m_neutral", "eastward_wind_10m_neutral", "northward_wind_10m_neutral", "surface_drag_coefficient_for_momentum_in_air", "air_density", "surface_downward_eastward_stress", "surface_downward_northward_stress", "magnitude_of_surface_downward_stress", "coriolis_parameter", "beta_parameter", "ekman_transport_eastward", "ekman_transport_northward", "ekman_depth_empirical", "ekman_depth_theoretical", "eastward_sea_water_velocity_due_to_ekman_drift", "northward_sea_water_velocity_due_to_ekman_drift", "coastal_upwelling_index", "surface_eastward_sea_water_velocity", "surface_northward_sea_water_velocity", "platform_speed_wrt_ground", "current_wind_angle", "current_wind_ratio", "flags") SELECT "dataset_id", "platform", "time", "valid_from", "valid_to", "latitude", "longitude", "wind_speed", "wind_from_direction", "eastward_wind", "northward_wind", "wind_speed_of_gust", "air_temperature", "air_pressure", "air_pressure_at_mean_sea_level", "relative_humidity", "sea_surface_temperature", "sea_water_temperature", "sea_water_practical_salinity", "eastward_sea_water_velocity", "northward_sea_water_velocity", "sea_water_speed", "sea_water_velocity_to_direction", "wind_speed_10m_neutral", "eastward_wind_10m_neutral", "northward_wind_10m_neutral", "surface_drag_coefficient_for_momentum_in_air", "air_density", "surface_downward_eastward_stress", "surface_downward_northward_stress", "magnitude_of_surface_downward_stress", "coriolis_parameter", "beta_parameter", "ekman_transport_eastward", "ekman_transport_northward", "ekman_depth_empirical", "ekman_depth_theoretical", "eastward_sea_water_velocity_due_to_ekman_drift", "northward_sea_water_velocity_due_to_ekman_drift", "coastal_upwelling_index", "surface_eastward_sea_water_velocity", "surface_northward_sea_water_velocity", "platform_speed_wrt_ground", "current_wind_angle", "current_wind_ratio", decode(concat(lpad(to_hex(coalesce("latitude_qc", 0)), 2, '0'), lpad(to_hex(coalesce("longitude_qc", 0)), 2, '0'), lpad(to_hex(coalesce("wind_speed_qc", 0)), 2, '0'), lpad(to_hex(coalesce("wind_from_direction_qc", 0)), 2, '0'), lpad(to_hex(coalesce("eastward_wind_qc", 0)), 2, '0'), lpad(to_hex(coalesce("northward_wind_qc", 0)), 2, '0'), lpad(to_hex(coalesce("wind_speed_of_gust_qc", 0)), 2, '0'), lpad(to_hex(coalesce("air_temperature_qc", 0)), 2, '0'), lpad(to_hex(coalesce("air_pressure_qc", 0)), 2, '0'), lpad(to_hex(coalesce("air_pressure_at_mean_sea_level_qc", 0)), 2, '0'), lpad(to_hex(coalesce("relative_humidity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("sea_surface_temperature_qc", 0)), 2, '0'), lpad(to_hex(coalesce("sea_water_temperature_qc", 0)), 2, '0'), lpad(to_hex(coalesce("sea_water_practical_salinity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("eastward_sea_water_velocity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("northward_sea_water_velocity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("sea_water_speed_qc", 0)), 2, '0'), lpad(to_hex(coalesce("sea_water_velocity_to_direction_qc", 0)), 2, '0'), lpad(to_hex(coalesce("wind_speed_10m_neutral_qc", 0)), 2, '0'), lpad(to_hex(coalesce("eastward_wind_10m_neutral_qc", 0)), 2, '0'), lpad(to_hex(coalesce("northward_wind_10m_neutral_qc", 0)), 2, '0'), lpad(to_hex(coalesce("surface_drag_coefficient_for_momentum_in_air_qc", 0)), 2, '0'), lpad(to_hex(coalesce("air_density_qc", 0)), 2, '0'), lpad(to_hex(coalesce("surface_downward_eastward_stress_qc", 0)), 2, '0'), lpad(to_hex(coalesce("surface_downward_northward_stress_qc", 0)), 2, '0'), lpad(to_hex(coalesce("magnitude_of_surface_downward_stress_qc", 0)), 2, '0'), lpad(to_hex(coalesce("coriolis_parameter_qc", 0)), 2, '0'), lpad(to_hex(coalesce("beta_parameter_qc", 0)), 2, '0'), lpad(to_hex(coalesce("ekman_transport_eastward_qc", 0)), 2, '0'), lpad(to_hex(coalesce("ekman_transport_northward_qc", 0)), 2, '0'), lpad(to_hex(coalesce("ekman_depth_empirical_qc", 0)), 2, '0'), lpad(to_hex(coalesce("ekman_depth_theoretical_qc", 0)), 2, '0'), lpad(to_hex(coalesce("eastward_sea_water_velocity_due_to_ekman_drift_qc", 0)), 2, '0'), lpad(to_hex(coalesce("northward_sea_water_velocity_due_to_ekman_drift_qc", 0)), 2, '0'), lpad(to_hex(coalesce("coastal_upwelling_index_qc", 0)), 2, '0'), lpad(to_hex(coalesce("surface_eastward_sea_water_velocity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("surface_northward_sea_water_velocity_qc", 0)), 2, '0'), lpad(to_hex(coalesce("platform_speed_wrt_ground_qc", 0)), 2, '0'), lpad(to_hex(coalesce("current_wind_angle_qc", 0)), 2, '0'), lpad(to_hex(coalesce("current_wind_ratio_qc", 0)), 2, '0')), 'hex') FROM "records_previous" ORDER BY "dataset_id", "platform", "time", "valid_from";--> statement-breakpoint
DROP TABLE "records_previous";--> statement-breakpoint
CREATE TRIGGER records_frozen_update_guard AFTER UPDATE ON records REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_update_guard();--> statement-breakpoint
CREATE TRIGGER records_frozen_delete_guard AFTER DELETE ON records REFERENCING OLD TABLE AS old_rows
  FOR EACH STATEMENT EXECUTE FUNCTION records_frozen_delete_guard();--> statement-breakpoint
CREATE TRIGGER records_no_truncate BEFORE TRUNCATE ON records FOR EACH STATEMENT EXECUTE FUNCTION records_no_truncate();
