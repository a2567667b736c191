import { parseDocument, YAMLParseError } from "yaml";
import { InputError, type ErrorCode } from "../errors.js";

/**
 * A small settings file as plain data: YAML (the 1.2 core schema, warnings silent, no custom tags, aliases
 * capped at 100) or, for a `.json` name (or `json: true`), JSON. A syntax problem is `code` with its line and column.
 */
export function plainDocument(body: string, file: string, code: ErrorCode, json = /\.json$/i.test(file)): unknown {
  if (json) {
    try {
      return JSON.parse(body);
    } catch (e) {
      throw new InputError(code, { file, expected: "valid JSON (or a .yaml file)", received: (e as Error).message.split("\n")[0] });
    }
  }
  const y = parseDocument(body, { logLevel: "silent", prettyErrors: true, uniqueKeys: true });
  const problem = y.errors[0] ?? y.warnings.find((w) => w.code === "TAG_RESOLVE_FAILED");
  if (problem) {
    const pos = problem instanceof YAMLParseError || "linePos" in problem ? problem.linePos?.[0] : undefined;
    throw new InputError(code, { file, line: pos?.line, column: pos?.col, expected: y.errors[0] ? "valid YAML" : "plain YAML values (no custom tags)", received: problem.message.split("\n")[0]!.slice(0, 120) });
  }
  try {
    return y.toJS({ maxAliasCount: 100 });
  } catch (e) {
    throw new InputError(code, { file, expected: "valid YAML", received: (e as Error).message.split("\n")[0] });
  }
}
