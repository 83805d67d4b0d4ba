import { Validator } from "@seriousme/openapi-schema-validator";
import { describe, expect, it } from "vitest";
import { openApiDocument } from "./openapi";

type JsonSchema = {
  properties?: Record<string, JsonSchema>;
  items?: JsonSchema;
  enum?: unknown[];
  default?: unknown;
  description?: string;
};

describe("the OpenAPI document", () => {
  it("is valid OpenAPI 3.1 (@seriousme/openapi-schema-validator) and lists each text line's fit rule, shrink by default", async () => {
    const doc = openApiDocument();
    const v = new Validator();
    const res = await v.validate(doc as never);
    expect(res.errors ?? []).toEqual([]);
    expect(v.version).toBe("3.1");
    const options = doc.components.schemas.SlabOptions as JsonSchema;
    const fit = options.properties!.marks!.properties!.text!.items!.properties!.fit!;
    expect(fit.enum).toEqual(["shrink", "refuse"]);
    expect(fit.default).toBe("shrink");
    expect(fit.description).toMatch(/text_shrunk/);
    expect(JSON.stringify(doc.paths["/api/v1/plates"])).toContain("text_too_long");
  });
});
