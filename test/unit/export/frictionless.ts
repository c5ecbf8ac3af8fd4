import fs from "node:fs";
import { Ajv } from "ajv";

const fixture = (name: string) => JSON.parse(fs.readFileSync(new URL(`../../fixtures/frictionless/${name}`, import.meta.url), "utf8")) as object;

/** Ajv with the transcribed Frictionless v1 schemas (test/fixtures/frictionless/README.md). */
export function frictionlessValidator() {
  const ajv = new Ajv({ allErrors: true, strict: false, validateFormats: false });
  ajv.addSchema(fixture("table-schema.json"));
  return ajv.compile(fixture("tabular-data-package.json"));
}
