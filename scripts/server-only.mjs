// Loaded with `--import` before a script runs: lib/**/queries.ts import "server-only", which throws
// unless resolved under React's "react-server" condition (its empty module). Scripts are server
// code, so that one package is resolved that way.
import { register } from "node:module";

const hook = `export async function resolve(specifier, context, next) {
  if (specifier !== "server-only") return next(specifier, context);
  return next(specifier, { ...context, conditions: [...context.conditions, "react-server"] });
}`;
register(`data:text/javascript,${encodeURIComponent(hook)}`, import.meta.url);
