import { randomUUID } from "node:crypto";
import { fileURLToPath } from "node:url";
import { and, eq } from "drizzle-orm";
import { hashPassword } from "better-auth/crypto";
import type { Db } from "./client";
import { account, datasets, deployments, memberships, platforms, projects, user } from "./schema";

/**
 * The demo scenario, all invented: the Merrow Shelf Observing Programme runs three moorings on a
 * west-facing shelf (enough for the array diagnostics) and a fleet of surface drifters. People, names
 * and places are made up; only the ocean coordinates are real water.
 */
export const demoPassword = "tauline-demo-2026";
export const demoUsers = [
  { key: "admin", name: "Ilse Varga", email: "admin@merrow.example", isAdmin: true, role: null },
  { key: "contributor", name: "Tomasz Rein", email: "data@merrow.example", isAdmin: false, role: "contributor" },
  { key: "curator", name: "Ada Quenby", email: "curator@merrow.example", isAdmin: false, role: "curator" },
  { key: "curator2", name: "Baptiste Oland", email: "curator2@merrow.example", isAdmin: false, role: "curator" },
] as const;

async function ensureUser(db: Db, u: (typeof demoUsers)[number]) {
  const [existing] = await db.select().from(user).where(eq(user.email, u.email));
  if (existing) return existing.id;
  const id = randomUUID();
  await db.transaction(async (tx) => {
    await tx.insert(user).values({ id, name: u.name, email: u.email, emailVerified: true, role: u.isAdmin ? "admin" : "user" });
    await tx.insert(account).values({ id: randomUUID(), accountId: id, providerId: "credential", userId: id, password: await hashPassword(demoPassword) });
  });
  return id;
}

/** Seeds the demo scenario; running it again changes nothing. */
export async function seedDemo(db: Db) {
  const ids: Record<string, string> = {};
  for (const u of demoUsers) ids[u.key] = await ensureUser(db, u);

  let [project] = await db.select().from(projects).where(eq(projects.slug, "merrow-shelf"));
  if (!project) {
    [project] = await db
      .insert(projects)
      .values({
        slug: "merrow-shelf",
        name: "Merrow Shelf Observing Programme",
        description:
          "Three surface moorings and a fleet of drogued drifters watching wind-driven upwelling on an invented west-facing shelf. All names and data in this demo are made up.",
      })
      .returning();
  }
  const projectId = project!.id;
  for (const u of demoUsers) {
    if (!u.role) continue;
    await db.insert(memberships).values({ projectId, userId: ids[u.key]!, role: u.role }).onConflictDoNothing();
  }

  const ensurePlatform = async (name: string, kind: "mooring" | "drifter", description: string) => {
    const [p] = await db.select().from(platforms).where(and(eq(platforms.projectId, projectId), eq(platforms.name, name)));
    if (p) return p.id;
    const [created] = await db.insert(platforms).values({ projectId, name, kind, description }).returning();
    return created!.id;
  };
  const north = await ensurePlatform("Merrow North", "mooring", "Surface mooring on the outer shelf, 3-cup anemometer and single-point current meter.");
  const south = await ensurePlatform("Merrow South", "mooring", "Surface mooring near the shelf break.");
  const inshore = await ensurePlatform("Merrow Inshore", "mooring", "Surface mooring on the inner shelf, sonic anemometer and single-point current meter.");
  const fleet = await ensurePlatform("Merrow drifter fleet", "drifter", "Six surface drifters drogued at 15 m, released together.");

  const ensureDeployment = async (platformId: string, values: Omit<typeof deployments.$inferInsert, "platformId">) => {
    const [d] = await db.select().from(deployments).where(and(eq(deployments.platformId, platformId), eq(deployments.name, values.name)));
    if (d) return d.id;
    const [created] = await db.insert(deployments).values({ ...values, platformId }).returning();
    return created!.id;
  };
  const common = { anemometerHeightM: 4, currentMeterDepthM: 10, coastlineOffshoreBearingDeg: 270 };
  const dNorth = await ensureDeployment(north, {
    name: "MN-2026-A",
    startTime: new Date("2026-03-01T00:00:00Z"),
    endTime: new Date("2026-09-30T00:00:00Z"),
    latitude: 41.62,
    longitude: -124.85,
    waterDepthM: 180,
    watchCircleRadiusM: 400,
    ...common,
  });
  const dSouth = await ensureDeployment(south, {
    name: "MS-2026-A",
    startTime: new Date("2026-03-02T00:00:00Z"),
    endTime: new Date("2026-09-29T00:00:00Z"),
    latitude: 41.18,
    longitude: -124.97,
    waterDepthM: 420,
    watchCircleRadiusM: 800,
    ...common,
  });
  const dInshore = await ensureDeployment(inshore, {
    name: "MI-2026-A",
    startTime: new Date("2026-03-03T00:00:00Z"),
    endTime: new Date("2026-09-30T00:00:00Z"),
    latitude: 41.43,
    longitude: -124.42,
    waterDepthM: 75,
    watchCircleRadiusM: 150,
    ...common,
  });
  const dFleet = await ensureDeployment(fleet, { name: "Release 2026-05", startTime: new Date("2026-05-10T00:00:00Z"), notes: "Released along 41.4°N." });

  const ensureDataset = async (title: string, deploymentId: string, description: string) => {
    const [d] = await db.select().from(datasets).where(and(eq(datasets.projectId, projectId), eq(datasets.title, title)));
    if (d) return d.id;
    const [created] = await db.insert(datasets).values({ projectId, deploymentId, title, description }).returning();
    return created!.id;
  };
  await ensureDataset("Merrow North surface met and currents, 2026", dNorth, "Wind, air temperature, pressure, humidity, SST and 10 m currents at 1-minute intervals.");
  await ensureDataset("Merrow South surface met and currents, 2026", dSouth, "Wind, met and 10 m currents at the shelf break, 1-minute intervals.");
  await ensureDataset("Merrow Inshore surface met and currents, 2026", dInshore, "Wind, met and 10 m currents on the inner shelf, 1-minute intervals.");
  await ensureDataset("Merrow drifter tracks, May 2026 release", dFleet, "Positions of six drogued drifters every 30 minutes.");
  return { projectId, users: ids };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const { db, pool } = await import("./client");
  await seedDemo(db);
  if (process.env.DEMO_SERIES !== "0") {
    const { seedDemoSeries } = await import("./seed-series");
    await seedDemoSeries(db, (m) => console.log(m));
  }
  const { stopSender } = await import("../jobs/queue");
  await stopSender();
  await pool.end();
  console.log("demo data seeded");
}
