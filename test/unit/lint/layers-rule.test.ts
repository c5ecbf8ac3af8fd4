import { join } from "node:path";
import { RuleTester } from "eslint";
import tseslint from "typescript-eslint";
import { describe, expect, test } from "vitest";
// @ts-expect-error plain JavaScript module without types (it is loaded by eslint.config.mjs)
import { layerOf, layersRule } from "../../../lib/lint/layers-rule.mjs";

// The layer table of DEVELOPERS.md "Layers", enforced by ESLint in `npm test`.
const ROOT = join(import.meta.dirname, "..", "..", "..");
const at = (path: string) => join(ROOT, path);

RuleTester.describe = describe;
RuleTester.it = test;
const tester = new RuleTester({ languageOptions: { parser: tseslint.parser, ecmaVersion: "latest", sourceType: "module" } });

describe("lapsebank/layers", () => {
  test("layers are found by path prefix", () => {
    expect(layerOf("lib/analysis/tropopause.ts")).toBe("lib/analysis");
    expect(layerOf("lib/env.ts")).toBe("lib/env");
    expect(layerOf("app/flights/[id]/page.tsx")).toBe("app");
    expect(layerOf("test/unit/x.test.ts")).toBeNull();
  });

  tester.run("layers", layersRule, {
    valid: [
      { filename: at("lib/ingest/store.ts"), code: `import { analyseFlight } from "../analysis/index.ts";` },
      { filename: at("lib/query/flights.ts"), code: `import { describe } from "../stats/describe.ts"; import { z } from "zod";` },
      { filename: at("app/flights/page.tsx"), code: `import { getDb } from "@/lib/db"; import type { Db } from "@/lib/db";` },
      { filename: at("lib/analysis/layers.ts"), code: `import { fitOrdinaryLeastSquares } from "./regression";` },
      { filename: at("test/integration/x.test.ts"), code: `import { getDb } from "../../lib/db/index.ts";` },
    ],
    invalid: [
      { filename: at("lib/analysis/layers.ts"), code: `import { getDb } from "../db/index.ts";`, errors: [{ messageId: "forbidden" }] },
      { filename: at("lib/stats/describe.ts"), code: `export * from "../query/flights.ts";`, errors: [{ messageId: "forbidden" }] },
      { filename: at("lib/query/setup-pages.ts"), code: `import { getProgramParameters } from "../ingest/store.ts";`, errors: [{ messageId: "forbidden" }] },
      { filename: at("lib/db/index.ts"), code: `const m = await import("../auth/permissions.ts");`, errors: [{ messageId: "forbidden" }] },
      { filename: at("app/flights/page.tsx"), code: `import { getDb, bulkInsert } from "@/lib/db";`, errors: [{ messageId: "names" }] },
    ],
  });
});
