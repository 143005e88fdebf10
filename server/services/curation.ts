import { and, asc, desc, eq, lt, sql, type SQL } from "drizzle-orm";
import {
  curationActions,
  type ApproveInput,
  type CurationAction,
  type HistoryEntry,
  type ReasonInput,
  type ReviewDecision,
  type SubmitInput,
  type VersionComparison,
  type VersionPermissions,
  type VersionReview,
} from "@shared/schemas/curation";
import { derivedVariables, measuredVariables } from "@shared/vocabulary";
import type { VersionState } from "@shared/schemas/datasets";
import type { Db } from "../db/client";
import { db } from "../db/client";
import { readI2 } from "../db/plot-arrays";
import { flagSql } from "../db/record-flags";
import { auditLog, datasets, plotSeries, projects, qcRuns, releases, reviews, uploads, user as users, versionComments, versions } from "../db/schema";
import { conflict, forbidden, notFound } from "../lib/errors";
import type { SessionUser } from "../middleware/require-session";
import { assertProjectAccess, getProjectRole } from "./access";
import { writeAudit } from "./audit";
import { deliver, notify, projectMemberIds, type PendingMail } from "./notifications";

export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** A version with the facts every transition needs: dataset, project, and who built and uploaded it. */
export interface VersionContext {
  id: string;
  number: number;
  state: VersionState;
  datasetId: string;
  datasetTitle: string;
  projectId: string;
  projectName: string;
  createdBy: string | null;
  uploaderId: string | null;
}

export async function loadVersionContext(tx: Tx | Db, versionId: string, lock = false): Promise<VersionContext | null> {
  const q = tx
    .select({
      id: versions.id,
      number: versions.number,
      state: versions.state,
      datasetId: versions.datasetId,
      datasetTitle: datasets.title,
      projectId: datasets.projectId,
      projectName: projects.name,
      createdBy: versions.createdBy,
      uploaderId: uploads.uploaderId,
    })
    .from(versions)
    .innerJoin(datasets, eq(datasets.id, versions.datasetId))
    .innerJoin(projects, eq(projects.id, datasets.projectId))
    .leftJoin(uploads, eq(uploads.id, versions.uploadId))
    .where(eq(versions.id, versionId));
  const [row] = lock ? await q.for("update", { of: versions }) : await q;
  return row ?? null;
}

/** Whoever uploaded or built a version cannot decide on it, whatever their role (four eyes). */
export function isOwnWork(user: SessionUser, v: Pick<VersionContext, "createdBy" | "uploaderId">) {
  return v.createdBy === user.id || v.uploaderId === user.id;
}

const stateWords: Record<VersionState, string> = {
  draft: "a draft",
  processing: "processing",
  ready: "ready",
  failed: "failed",
  in_review: "in review",
  changes_requested: "waiting for changes",
  rejected: "rejected",
  approved: "approved",
  released: "released",
  superseded: "superseded",
  retracted: "retracted",
};

const actionWords: Record<CurationAction, string> = {
  submit: "Only ready versions, or versions with changes requested that were rebuilt, can be submitted for review",
  approve: "Only versions in review can be approved",
  reject: "Only versions in review can be rejected",
  requestChanges: "Changes can be requested only on versions in review",
  release: "Only approved versions can be released",
  retract: "Only released or superseded versions can be retracted",
};

/** 409 unless the version is in a state the action starts from. */
export function assertTransition(action: CurationAction, v: Pick<VersionContext, "number" | "state">) {
  const from = curationActions[action].from as readonly VersionState[];
  if (!from.includes(v.state)) {
    throw conflict(`Version ${v.number} is ${stateWords[v.state]}. ${actionWords[action]}.`);
  }
}

/** Checks read access to the version's project first, so outsiders learn nothing about the version. */
async function versionForMember(user: SessionUser, versionId: string, need: "read" | "contribute" | "curate"): Promise<VersionContext> {
  const v = await loadVersionContext(db, versionId);
  if (!v) throw notFound("Version");
  await assertProjectAccess(user, v.projectId, "read");
  if (need !== "read") await assertProjectAccess(user, v.projectId, need);
  return v;
}

export const reviewPath = (versionId: string) => `/review/${versionId}`;

/**
 * Runs one state change: locks the version row, re-checks the state, moves it, writes the audit row and the
 * in-app notices in the same transaction; e-mails go out after commit.
 */
async function transition(
  user: SessionUser,
  versionId: string,
  action: CurationAction,
  opts: {
    reason?: string | null;
    check?: (v: VersionContext) => void;
    extra?: (tx: Tx, v: VersionContext) => Promise<PendingMail[]>;
  },
): Promise<void> {
  const mails = await db.transaction(async (tx) => {
    const v = await loadVersionContext(tx, versionId, true);
    if (!v) throw notFound("Version");
    assertTransition(action, v);
    opts.check?.(v);
    const to = curationActions[action].to;
    await tx.update(versions).set({ state: to, stateChangedAt: new Date() }).where(eq(versions.id, v.id));
    await writeAudit(tx, {
      actorId: user.id,
      action: `version.${action === "requestChanges" ? "request_changes" : action}`,
      entityType: "version",
      entityId: v.id,
      fromState: v.state,
      toState: to,
      reason: opts.reason ?? null,
    });
    return (await opts.extra?.(tx, v)) ?? [];
  });
  void deliver(mails);
}

// POST /api/versions/:id/submit
export async function submitVersion(user: SessionUser, versionId: string, input: SubmitInput): Promise<VersionReview> {
  await versionForMember(user, versionId, "contribute");
  await transition(user, versionId, "submit", {
    reason: input.note || null,
    extra: async (tx, v) => {
      if (input.note) await tx.insert(versionComments).values({ versionId: v.id, authorId: user.id, body: input.note });
      // A curator who built or uploaded the version cannot review it, so they are not asked to.
      const curators = (await projectMemberIds(tx, v.projectId, "curator")).filter((id) => id !== user.id && id !== v.createdBy && id !== v.uploaderId);
      return notify(tx, curators, {
        kind: "version_submitted",
        title: `Review requested: ${v.datasetTitle}, version ${v.number}`,
        body: `${user.name} submitted version ${v.number} of "${v.datasetTitle}" (${v.projectName}) for review.${input.note ? `\n\nNote: ${input.note}` : ""}`,
        link: reviewPath(v.id),
        versionId: v.id,
        because: `You receive this because you are a curator of ${v.projectName}.`,
      });
    },
  });
  return getVersionReview(user, versionId);
}

const decisionAction: Record<ReviewDecision, CurationAction> = { approved: "approve", rejected: "reject", changes_requested: "requestChanges" };
const decisionKind = { approved: "version_approved", rejected: "version_rejected", changes_requested: "changes_requested" } as const;
const decisionTitle: Record<ReviewDecision, string> = { approved: "Approved", rejected: "Rejected", changes_requested: "Changes requested" };

async function decide(user: SessionUser, versionId: string, decision: ReviewDecision, reason: string | null): Promise<VersionReview> {
  await versionForMember(user, versionId, "curate");
  const fourEyes = (v: VersionContext) => {
    if (isOwnWork(user, v)) {
      throw forbidden("You uploaded or built this version, so another curator must review it (four-eyes rule).");
    }
  };
  await transition(user, versionId, decisionAction[decision], {
    reason,
    check: fourEyes,
    extra: async (tx, v) => {
      await tx.insert(reviews).values({ versionId: v.id, reviewerId: user.id, decision, reason });
      const people = [v.uploaderId, v.createdBy].filter((id): id is string => !!id && id !== user.id);
      const said = reason ? `\n\nReason: ${reason}` : "";
      const next =
        decision === "approved"
          ? "A curator can now release it."
          : decision === "changes_requested"
            ? "Rebuild the version with the changes and submit it again."
            : "This version will not be released; build a new version from a corrected upload.";
      return notify(tx, people, {
        kind: decisionKind[decision],
        title: `${decisionTitle[decision]}: ${v.datasetTitle}, version ${v.number}`,
        body: `${user.name} ${decision === "approved" ? "approved" : decision === "rejected" ? "rejected" : "asked for changes to"} version ${v.number} of "${v.datasetTitle}" (${v.projectName}).${said}\n\n${next}`,
        link: reviewPath(v.id),
        versionId: v.id,
        because: "You receive this because you uploaded or built this version.",
      });
    },
  });
  return getVersionReview(user, versionId);
}

// POST /api/versions/:id/approve
export const approveVersion = (user: SessionUser, versionId: string, input: ApproveInput) => decide(user, versionId, "approved", input.reason || null);
// POST /api/versions/:id/reject
export const rejectVersion = (user: SessionUser, versionId: string, input: ReasonInput) => decide(user, versionId, "rejected", input.reason);
// POST /api/versions/:id/request-changes
export const requestChanges = (user: SessionUser, versionId: string, input: ReasonInput) => decide(user, versionId, "changes_requested", input.reason);

async function permissionsFor(user: SessionUser, v: VersionContext): Promise<VersionPermissions> {
  const role = await getProjectRole(user, v.projectId);
  const member = user.isAdmin || role !== null;
  const curator = user.isAdmin || role === "curator";
  const own = isOwnWork(user, v);
  const can = (a: CurationAction) => (curationActions[a].from as readonly VersionState[]).includes(v.state);
  return {
    canSubmit: member && can("submit"),
    canDecide: curator && !own && can("approve"),
    canRelease: curator && can("release"),
    canRetract: curator && can("retract"),
    canComment: member,
    fourEyesBlocked: curator && own && can("approve"),
  };
}

/** The state history of a version, from the audit log (oldest first). */
export async function versionHistory(versionId: string): Promise<HistoryEntry[]> {
  const rows = await db
    .select({ a: auditLog, name: users.name })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.entityType, "version"), eq(auditLog.entityId, versionId)))
    .orderBy(asc(auditLog.id));
  return rows.map((r) => ({
    at: r.a.at.toISOString(),
    actorName: r.name,
    action: r.a.action,
    fromState: r.a.fromState,
    toState: r.a.toState,
    reason: r.a.reason,
  }));
}

// GET /api/versions/:id/review
/** Everything the review page shows about a version; members of its project and admins only. */
export async function getVersionReview(user: SessionUser, versionId: string): Promise<VersionReview> {
  const v = await versionForMember(user, versionId, "read");
  const creator = db.select({ id: users.id, name: users.name }).from(users).as("creator");
  const uploader = db.select({ id: users.id, name: users.name }).from(users).as("uploader");
  const [row] = await db
    .select({ v: versions, creatorName: creator.name, uploaderName: uploader.name, uploadName: uploads.originalName })
    .from(versions)
    .leftJoin(creator, eq(creator.id, versions.createdBy))
    .leftJoin(uploads, eq(uploads.id, versions.uploadId))
    .leftJoin(uploader, eq(uploader.id, uploads.uploaderId))
    .where(eq(versions.id, versionId));
  const full = row!.v;
  // The base version when it was built by appending; otherwise the newest earlier version of the dataset.
  const [previous] = full.baseVersionId
    ? await db.select().from(versions).where(eq(versions.id, full.baseVersionId))
    : await db
        .select()
        .from(versions)
        .where(and(eq(versions.datasetId, v.datasetId), lt(versions.number, v.number)))
        .orderBy(desc(versions.number))
        .limit(1);
  const [rel] = await db.select({ id: releases.id }).from(releases).where(eq(releases.versionId, versionId));
  const [run] = await db.select({ counts: qcRuns.counts }).from(qcRuns).where(eq(qcRuns.versionId, versionId));
  return {
    version: {
      id: v.id,
      datasetId: v.datasetId,
      datasetTitle: v.datasetTitle,
      projectId: v.projectId,
      projectName: v.projectName,
      number: v.number,
      state: full.state,
      createdAt: full.createdAt.toISOString(),
      stateChangedAt: full.stateChangedAt.toISOString(),
      createdByName: row!.creatorName,
      uploaderName: row!.uploaderName,
      uploadName: row!.uploadName,
      summary: full.summary ?? null,
    },
    previous: previous ? { id: previous.id, number: previous.number, state: previous.state, summary: previous.summary ?? null } : null,
    history: await versionHistory(versionId),
    qc: run?.counts ?? null,
    stretches: await flaggedStretches(versionId),
    releaseId: rel?.id ?? null,
    permissions: await permissionsFor(user, { ...v, state: full.state }),
  };
}

/** Guards for other services (releases, comments). */
export { versionForMember };


/** Hourly plot buckets whose worst flag is suspect (3) or fail (4), joined into stretches; the longest first. */
async function flaggedStretches(versionId: string, limit = 12): Promise<VersionReview["stretches"]> {
  const rows = await db
    .select({ platform: plotSeries.platform, variable: plotSeries.variable, stepS: plotSeries.stepS, t0: plotSeries.t0, worst: plotSeries.worstFlag })
    .from(plotSeries)
    .where(and(eq(plotSeries.versionId, versionId), eq(plotSeries.stepS, 3600)));
  const out: VersionReview["stretches"] = [];
  const iso = (t: number) => new Date(t * 1000).toISOString();
  for (const row of rows) {
    const r = { ...row, worst: readI2(row.worst) };
    let start = -1;
    let worst = 0;
    for (let i = 0; i <= r.worst.length; i++) {
      const f = i < r.worst.length ? r.worst[i]! : 0;
      if (f === 3 || f === 4) {
        if (start < 0) start = i;
        worst = Math.max(worst, f);
      } else if (start >= 0) {
        out.push({ platform: r.platform, variable: r.variable, from: iso(r.t0 + start * r.stepS), to: iso(r.t0 + i * r.stepS), hours: ((i - start) * r.stepS) / 3600, worstFlag: worst });
        start = -1;
        worst = 0;
      }
    }
  }
  return out.sort((a, b) => b.worstFlag - a.worstFlag || b.hours - a.hours).slice(0, limit);
}

const knownColumns = new Set<string>([...measuredVariables, ...derivedVariables]);

function summaryVariables(summary: unknown): string[] {
  const vars = (summary as { variables?: { variable?: unknown }[] } | null)?.variables;
  return Array.isArray(vars) ? vars.map((v) => String(v.variable)).filter((v) => knownColumns.has(v)) : [];
}

// GET /api/versions/:id/compare
/**
 * Compares a version's records with the previous version's. Records carry a validity range of version numbers
 * (server/db/schema/records.ts), so only rows that start after the previous version or end before this one can
 * differ: those two small sets are joined on (platform, time), never the whole series.
 */
export async function compareVersion(user: SessionUser, versionId: string): Promise<VersionComparison> {
  const review = await getVersionReview(user, versionId);
  const v = review.version;
  const p = review.previous;
  if (!p || p.number >= v.number) {
    const [{ n }] = (await db.execute(sql`select count(*)::int as n from records where dataset_id = ${v.datasetId} and valid_from <= ${v.number} and (valid_to is null or valid_to > ${v.number})`))
      .rows as [{ n: number }];
    return { versionId: v.id, number: v.number, previous: null, rowsAdded: n, rowsRemoved: 0, rowsChanged: 0, variables: [] };
  }
  const names = [...new Set([...summaryVariables(v.summary), ...summaryVariables(p.summary)])];
  const cols = names.length ? names : [...knownColumns];
  const both = sql`n.time is not null and o.time is not null`;
  const pair = (prefix: string, c: string) => sql`${sql.raw(prefix)}.${sql.identifier(c)}`;
  const rowN: SQL[] = [];
  const rowO: SQL[] = [];
  for (const c of cols) {
    rowN.push(pair("n", c));
    rowO.push(pair("o", c));
  }
  // Flags compared byte by byte: a whole-row comparison of the packed flags covers every variable at once.
  rowN.push(sql`n.flags`);
  rowO.push(sql`o.flags`);
  const perVar = cols.flatMap((c, i) => [
    sql`count(*) filter (where ${both} and ${sql.raw(flagSql(c, "n."))} is distinct from ${sql.raw(flagSql(c, "o."))})::int as ${sql.identifier(`f${i}`)}`,
    sql`count(*) filter (where ${both} and ${pair("n", c)} is distinct from ${pair("o", c)})::int as ${sql.identifier(`v${i}`)}`,
  ]);
  const res = await db.execute(sql`
    with n as (
      select * from records where dataset_id = ${v.datasetId} and valid_from > ${p.number} and valid_from <= ${v.number}
        and (valid_to is null or valid_to > ${v.number})
    ), o as (
      select * from records where dataset_id = ${v.datasetId} and valid_from <= ${p.number}
        and valid_to is not null and valid_to > ${p.number} and valid_to <= ${v.number}
    )
    select
      count(*) filter (where o.time is null)::int as added,
      count(*) filter (where n.time is null)::int as removed,
      count(*) filter (where ${both} and (${sql.join(rowN, sql`, `)}) is distinct from (${sql.join(rowO, sql`, `)}))::int as changed,
      ${sql.join(perVar, sql`, `)}
    from n full join o on n.platform = o.platform and n.time = o.time`);
  const row = res.rows[0] as Record<string, number>;
  return {
    versionId: v.id,
    number: v.number,
    previous: { id: p.id, number: p.number },
    rowsAdded: row.added!,
    rowsRemoved: row.removed!,
    rowsChanged: row.changed!,
    variables: cols.map((c, i) => ({ variable: c, flagsChanged: row[`f${i}`]!, valuesChanged: row[`v${i}`]! })).filter((x) => x.flagsChanged || x.valuesChanged || names.length),
  };
}
