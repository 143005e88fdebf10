import { describe, expect, test } from "vitest";
import { routeRules } from "../../server/lib/routes";
import { as, testApp } from "../helpers/api";

describe("OpenAPI description", () => {
  test("an OpenAPI 3.1 document lists every /api/v1 route with its method, parameters and access", async () => {
    testApp();
    const res = await as(null).get("/api/v1/openapi.json");
    expect(res.status).toBe(200);
    const doc = res.body;
    // OpenAPI 3.1.0 (spec.openapis.org/oas/v3.1.0): `openapi`, `info.title`, `info.version` required; JSON Schema 2020-12 dialect.
    expect(doc.openapi).toBe("3.1.0");
    expect(doc.info.title).toBeTruthy();
    expect(doc.info.version).toBe("1");
    expect(doc.jsonSchemaDialect).toBe("https://json-schema.org/draft/2020-12/schema");
    const v1 = routeRules.filter((r) => r.path.startsWith("/api/v1/"));
    expect(v1.length).toBeGreaterThanOrEqual(12);
    for (const r of v1) {
      const path = r.path.replace(/:([A-Za-z]+)/g, "{$1}");
      const op = doc.paths[path]?.[r.method.toLowerCase()];
      expect(op, `${r.method} ${path}`).toBeDefined();
      expect(op.description).toContain("Access:");
      // Every {param} in the path is declared as a required path parameter (OpenAPI 3.1 §4.8.12).
      for (const m of path.matchAll(/\{(\w+)\}/g)) expect(op.parameters.find((p: { name: string; in: string }) => p.name === m[1] && p.in === "path")?.required).toBe(true);
    }
    // Nothing outside the versioned API is described as if it were stable.
    expect(Object.keys(doc.paths).every((p) => p.startsWith("/api/v1/"))).toBe(true);
  });

  test("schemas come from the shared zod schemas: the download query and the catalogue answer", async () => {
    const doc = (await as(null).get("/api/v1/openapi.json")).body;
    const dl = doc.paths["/api/v1/versions/{id}/download"].get;
    const params = Object.fromEntries(dl.parameters.map((p: { name: string; schema: unknown }) => [p.name, p.schema]));
    expect(Object.keys(params).sort()).toEqual(["every", "format", "from", "id", "qc", "to", "variables"]);
    expect(params.format.enum).toEqual(["csv", "datapackage", "parquet"]);
    expect(params.qc.enum).toEqual(["all", "pass", "pass_suspect"]);
    expect(Object.keys(dl.responses["200"].content).sort()).toEqual(["application/vnd.apache.parquet", "application/zip", "text/csv"]);
    const cat = doc.paths["/api/v1/catalogue"].get.responses["200"].content["application/json"].schema;
    expect(cat.required).toEqual(expect.arrayContaining(["items", "total", "page", "pageSize"]));
    expect(cat.properties.items.items.properties.bounds).toBeDefined();
    const tokenBody = doc.paths["/api/v1/tokens"].post.requestBody.content["application/json"].schema;
    expect(tokenBody.properties.scope.enum).toEqual(["read", "upload"]);
    // Every local $ref resolves.
    const text = JSON.stringify(doc);
    for (const m of text.matchAll(/"\$ref":"#\/([^"]+)"/g)) {
      const target = m[1]!.split("/").reduce((o: Record<string, unknown> | undefined, k) => o?.[k] as Record<string, unknown> | undefined, doc);
      expect(target, m[1]).toBeDefined();
    }
    expect(doc.components.securitySchemes.bearerToken).toMatchObject({ type: "http", scheme: "bearer" });
  });
});
