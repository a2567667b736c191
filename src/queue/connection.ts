import { InputError } from "../errors.js";

/** How to reach the database: a URL from --db, or node-postgres's own reading of the PG* variables. */
export interface DbTarget {
  /** For pg.Pool: `{ connectionString }`, or `{}` to let pg read PGHOST, PGPORT, PGUSER, PGPASSWORD, PGDATABASE. */
  config: { connectionString?: string };
  /** The target without its password, for messages: `postgres://user@host:port/db`. */
  label: string;
  /** Secrets to blank out of any text we print (the password, wherever it came from). */
  secrets: string[];
  /** Said once on stderr when the URL itself carries a password (process lists, shell history, logs). */
  warning?: string | undefined;
}

/** libpq connection parameters that hold a secret, in a URL's query string or a key=value text. */
const SECRET_PARAMS = ["password", "sslpassword"];

export function dbTarget(url: string | undefined, env: NodeJS.ProcessEnv): DbTarget {
  const secrets = [env.PGPASSWORD].filter((s): s is string => typeof s === "string" && s !== "");
  if (url !== undefined) {
    let u: URL;
    try {
      u = new URL(url);
    } catch {
      throw new InputError("OPTION_INVALID", {
        option: "--db",
        expected: "a URL postgres://user@host:port/database",
        received: "text that is not a URL",
      });
    }
    if (u.protocol !== "postgres:" && u.protocol !== "postgresql:") {
      throw new InputError("OPTION_INVALID", {
        option: "--db",
        expected: "a URL that starts postgres:// or postgresql://",
        received: JSON.stringify(`${u.protocol}//…`),
      });
    }
    const inUrl = u.password !== "" || SECRET_PARAMS.some((k) => u.searchParams.has(k));
    if (u.password !== "") secrets.push(u.password, decodeURIComponent(u.password));
    u.password = "";
    for (const k of SECRET_PARAMS) {
      for (const v of u.searchParams.getAll(k)) if (v !== "") secrets.push(v, encodeURIComponent(v));
      u.searchParams.delete(k);
    }
    const warning = inUrl
      ? "psdgate: warning: the --db URL carries a password, which process lists, shell history and logs can show; give it with PGPASSWORD, a ~/.pgpass file or a service file (PGSERVICE) instead"
      : undefined;
    return { config: { connectionString: url }, label: u.toString(), secrets, warning };
  }
  if (env.PGHOST === undefined && env.PGDATABASE === undefined && env.PGSERVICE === undefined) {
    throw new InputError("DB_NOT_GIVEN", {
      option: "--db",
      expected: "--db postgres://user@host:port/database, or PGHOST / PGDATABASE in the environment",
      received: "neither",
    });
  }
  const host = env.PGHOST ?? "localhost";
  const label = `postgres://${env.PGUSER ? `${encodeURIComponent(env.PGUSER)}@` : ""}${host}${env.PGPORT ? `:${env.PGPORT}` : ""}/${env.PGDATABASE ?? ""} (from PG* variables)`;
  return { config: {}, label, secrets };
}

/** `text` with every secret of the target and any `user:password@` in a URL blanked. */
export function redact(text: string, target: Pick<DbTarget, "secrets"> | undefined): string {
  let s = text
    .replace(/(postgres(?:ql)?:\/\/[^:/@\s]*):[^@\s]*@/g, "$1:***@")
    // ?password=… or &sslpassword=… in a URL, and password=… in a key=value connection text.
    .replace(/(\b(?:ssl)?password=)(?:'(?:[^'\\]|\\.)*'|[^&\s'"]*)/gi, "$1***");
  for (const secret of target?.secrets ?? []) if (secret.length > 0) s = s.split(secret).join("***");
  return s;
}
