import { sql } from "drizzle-orm";
import { check, doublePrecision, index, pgEnum, pgTable, primaryKey, text, timestamp, unique, uuid } from "drizzle-orm/pg-core";
import { projectRoles } from "@shared/schemas/projects";
import { platformKinds } from "@shared/schemas/platforms";
import { user } from "./auth";

export const projectRole = pgEnum("project_role", projectRoles);
export const platformKind = pgEnum("platform_kind", platformKinds);

export const projects = pgTable("projects", {
  id: uuid().primaryKey().defaultRandom(),
  slug: text().notNull().unique(),
  name: text().notNull(),
  description: text(),
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
});

export const memberships = pgTable(
  "memberships",
  {
    projectId: uuid().notNull().references(() => projects.id, { onDelete: "cascade" }),
    userId: text().notNull().references(() => user.id, { onDelete: "cascade" }),
    role: projectRole().notNull(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.projectId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

export const platforms = pgTable(
  "platforms",
  {
    id: uuid().primaryKey().defaultRandom(),
    projectId: uuid().notNull().references(() => projects.id, { onDelete: "restrict" }),
    name: text().notNull(),
    kind: platformKind().notNull(),
    wmoNumber: text(),
    description: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("platforms_project_name_key").on(t.projectId, t.name),
    check("platforms_wmo_number_check", sql`${t.wmoNumber} ~ '^([0-9]{5}|[0-9]{7})$'`),
  ],
);

export const deployments = pgTable(
  "deployments",
  {
    id: uuid().primaryKey().defaultRandom(),
    platformId: uuid().notNull().references(() => platforms.id, { onDelete: "restrict" }),
    name: text().notNull(),
    startTime: timestamp({ withTimezone: true }).notNull(),
    endTime: timestamp({ withTimezone: true }),
    latitude: doublePrecision(),
    longitude: doublePrecision(),
    waterDepthM: doublePrecision(),
    watchCircleRadiusM: doublePrecision(),
    anemometerHeightM: doublePrecision(),
    currentMeterDepthM: doublePrecision(),
    coastlineOffshoreBearingDeg: doublePrecision(),
    notes: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("deployments_platform_name_key").on(t.platformId, t.name),
    check("deployments_latitude_check", sql`${t.latitude} between -90 and 90`),
    check("deployments_longitude_check", sql`${t.longitude} between -180 and 180`),
    check("deployments_position_pair_check", sql`(${t.latitude} is null) = (${t.longitude} is null)`),
    check("deployments_time_order_check", sql`${t.endTime} is null or ${t.endTime} > ${t.startTime}`),
    check("deployments_water_depth_check", sql`${t.waterDepthM} > 0`),
    check("deployments_watch_circle_check", sql`${t.watchCircleRadiusM} > 0`),
    check("deployments_anemometer_height_check", sql`${t.anemometerHeightM} > 0`),
    check("deployments_current_depth_check", sql`${t.currentMeterDepthM} > 0`),
    check("deployments_coast_bearing_check", sql`${t.coastlineOffshoreBearingDeg} >= 0 and ${t.coastlineOffshoreBearingDeg} < 360`),
  ],
);
