/**
 * The OpenAPI 3.1 description of the versioned API (/api/v1), generated at start-up from the zod schemas in
 * shared/ (zod's own JSON Schema output, draft 2020-12, which OpenAPI 3.1 uses as is) and from routeRules, the
 * list every route declares with its access rule. A /api/v1 route without an entry here is still listed, with
 * its access, so the document never hides a route.
 */
import { z } from "zod";
import { apiErrorSchema } from "@shared/errors";
import { catalogueSearchSchema, cataloguePageSchema, datasetLandingSchema } from "@shared/schemas/catalogue";
import { releaseSchema } from "@shared/schemas/curation";
import { datasetSchema } from "@shared/schemas/datasets";
import { downloadQuerySchema, releaseVerificationSchema } from "@shared/schemas/downloads";
import { apiTokenSchema, createApiTokenInputSchema, createdApiTokenSchema } from "@shared/schemas/tokens";
import { arrayDiagnosticsQuerySchema, arrayDiagnosticsSchema } from "@shared/schemas/versions";
import { routeRules, type RouteAccess } from "../lib/routes";

interface Doc {
  summary: string;
  description?: string;
  tag: string;
  query?: z.ZodType;
  body?: z.ZodType;
  /** JSON answer schema, and/or files (media types) for downloads. */
  response?: z.ZodType;
  files?: string[];
  status?: number;
}

const list = <T extends z.ZodType>(item: T) => z.object({ items: z.array(item) });

/** What each documented route takes and answers, keyed "METHOD path" as in routeRules. */
const docs: Record<string, Doc> = {
  "GET /api/v1/catalogue": {
    tag: "Catalogue",
    summary: "Search released datasets",
    description: "Released datasets only. Filters combine (AND); `q` matches title, project, platform and variable names.",
    query: catalogueSearchSchema,
    response: cataloguePageSchema,
  },
  "GET /api/v1/datasets/{id}": { tag: "Catalogue", summary: "A dataset", response: datasetSchema },
  "GET /api/v1/datasets/{id}/landing": {
    tag: "Catalogue",
    summary: "A dataset's landing page",
    description: "Description, coverage, variables with CF standard names and units, versions, releases with checksums, citation (text, BibTeX, RIS).",
    response: datasetLandingSchema,
  },
  "GET /api/v1/datasets/{id}/releases": { tag: "Releases", summary: "Every release of a dataset, newest first", response: list(releaseSchema) },
  "GET /api/v1/releases/{id}": { tag: "Releases", summary: "A release (or the tombstone of a retracted one)", response: releaseSchema },
  "GET /api/v1/releases/{id}/files/{name}": {
    tag: "Releases",
    summary: "A whole-release file, built at release",
    description: "The SHA-256 fixed at release is sent as `Repr-Digest` and re-checked while the file is served; a mismatch aborts the transfer.",
    files: ["text/csv", "application/zip", "application/vnd.apache.parquet"],
  },
  "GET /api/v1/releases/{id}/verify": {
    tag: "Releases",
    summary: "Re-check the release files' SHA-256",
    response: releaseVerificationSchema,
  },
  "GET /api/v1/versions/{id}/download": {
    tag: "Downloads",
    summary: "Download a version, whole or a subset",
    description:
      "Released and superseded versions for everyone; other versions for project members only. CSV times are ISO 8601 UTC; each variable (canonical unit) is followed by its `<name>_qc` flag (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing). `datapackage` is a Frictionless Data Package zip. Anonymous callers are rate-limited.",
    query: downloadQuerySchema,
    files: ["text/csv", "application/zip", "application/vnd.apache.parquet"],
  },
  "GET /api/v1/projects/{id}/array-diagnostics": {
    tag: "Projects",
    summary: "A project's array diagnostics: wind-stress curl, Ekman pumping and Sverdrup transport",
    description:
      "Hourly steps where three or more of the project's moorings (and drifters measuring wind) within 500 km of each other have a wind stress: curl from a least-squares plane fit, Ekman pumping with the β term, Sverdrup transport; the platforms that took part; a caution. Project members only. `format=csv` gives every step as CSV in SI units. Estimates for science, not operational guidance.",
    query: arrayDiagnosticsQuerySchema,
    response: arrayDiagnosticsSchema,
    files: ["text/csv"],
  },
  "GET /api/v1/tokens": { tag: "Tokens", summary: "Your API tokens", response: list(apiTokenSchema) },
  "POST /api/v1/tokens": {
    tag: "Tokens",
    summary: "Make an API token (the secret is shown in this answer only)",
    body: createApiTokenInputSchema,
    response: createdApiTokenSchema,
    status: 201,
  },
  "DELETE /api/v1/tokens/{id}": { tag: "Tokens", summary: "Revoke an API token", response: apiTokenSchema },
  "GET /api/v1/openapi.json": { tag: "API", summary: "This document" },
};

const toJson = (schema: z.ZodType, io: "input" | "output") =>
  z.toJSONSchema(schema, { io, unrepresentable: "any", target: "draft-2020-12" }) as Record<string, unknown>;

const accessText: Record<RouteAccess, string> = {
  public: "Anyone (a session or API token is used when given).",
  session: "Signed in (session cookie or API token; tokens may only read).",
  admin: "Global admins.",
};

/** Express ":id" → OpenAPI "{id}". */
const oaPath = (p: string) => p.replace(/:([A-Za-z]+)/g, "{$1}");

function queryParameters(schema: z.ZodType) {
  const js = toJson(schema, "input") as { properties?: Record<string, Record<string, unknown>>; required?: string[] };
  return Object.entries(js.properties ?? {}).map(([name, s]) => ({
    name,
    in: "query",
    required: (js.required ?? []).includes(name),
    ...(typeof s.description === "string" ? { description: s.description } : {}),
    schema: s,
  }));
}

/** The OpenAPI 3.1 document of every /api/v1 route. */
export function openApiDocument(serverUrl: string) {
  const paths: Record<string, Record<string, unknown>> = {};
  const errorRef = { $ref: "#/components/schemas/Error" };
  for (const rule of routeRules.filter((r) => r.path.startsWith("/api/v1/") || r.path === "/api/v1")) {
    const path = oaPath(rule.path);
    const key = `${rule.method} ${path}`;
    const doc = docs[key];
    const params = [...path.matchAll(/\{([A-Za-z]+)\}/g)].map((m) => ({
      name: m[1],
      in: "path",
      required: true,
      schema: m[1] === "name" ? { type: "string" } : { type: "string", format: "uuid" },
    }));
    const ok = String(doc?.status ?? 200);
    const responses: Record<string, unknown> = {
      [ok]: {
        description: "OK",
        ...(doc?.response || doc?.files
          ? {
              content: {
                ...(doc.response ? { "application/json": { schema: toJson(doc.response, "output") } } : {}),
                ...Object.fromEntries((doc.files ?? []).map((m) => [m, { schema: { type: "string", contentMediaType: m } }])),
              },
            }
          : {}),
      },
      "400": { description: "A parameter is wrong; `details` names each field", content: { "application/json": { schema: errorRef } } },
      "401": { description: "Sign in or send an API token", content: { "application/json": { schema: errorRef } } },
      "403": { description: "Not allowed for this caller", content: { "application/json": { schema: errorRef } } },
      "404": { description: "Not found", content: { "application/json": { schema: errorRef } } },
    };
    if (doc?.files && rule.access === "public") responses["429"] = { description: "Too many anonymous downloads", content: { "application/json": { schema: errorRef } } };
    (paths[path] ??= {})[rule.method.toLowerCase()] = {
      tags: [doc?.tag ?? "Other"],
      summary: doc?.summary ?? `${rule.method} ${path}`,
      description: [doc?.description, `Access: ${accessText[rule.access]}`].filter(Boolean).join("\n\n"),
      operationId: `${rule.method.toLowerCase()}${path.replace(/\/api\/v1/, "").replace(/[{}]/g, "").replace(/(^|[/_.-])([a-z])/g, (_m, _s, c: string) => c.toUpperCase())}`,
      parameters: [...params, ...(doc?.query ? queryParameters(doc.query) : [])],
      ...(doc?.body ? { requestBody: { required: true, content: { "application/json": { schema: toJson(doc.body, "input") } } } } : {}),
      responses,
      security: rule.access === "public" ? [{}, { bearerToken: [] }, { sessionCookie: [] }] : [{ bearerToken: [] }, { sessionCookie: [] }],
    };
  }
  return {
    openapi: "3.1.0",
    jsonSchemaDialect: "https://json-schema.org/draft/2020-12/schema",
    info: {
      title: "Tauline API",
      version: "1",
      description:
        "Find released ocean and air-sea data sets and download them (CSV, Frictionless Data Package, Parquet). Scripts authenticate with a personal API token: `Authorization: Bearer tln_…`. Derived diagnostics are scientific estimates, not for navigation or safety.",
    },
    servers: [{ url: serverUrl }],
    tags: ["Catalogue", "Releases", "Downloads", "Tokens", "API"].map((name) => ({ name })),
    paths,
    components: {
      schemas: { Error: toJson(apiErrorSchema, "output") },
      securitySchemes: {
        bearerToken: { type: "http", scheme: "bearer", description: "A personal API token (scope read or upload)" },
        sessionCookie: { type: "apiKey", in: "cookie", name: "better-auth.session_token" },
      },
    },
  };
}
