/**
 * The engines the emitted SQL is run on in tests: DuckDB embedded (@duckdb/node-api) and a real
 * PostgreSQL server started for the test from Debian's postgresql package and removed after.
 * Both load the windows CSV as it is written (every column as text) and return the query's rows.
 */
import { spawnSync } from "node:child_process";
import {
  chownSync,
  existsSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { DuckDBInstance } from "@duckdb/node-api";
import { parse as parseCsv } from "csv-parse/sync";

/** One row of the sessions table, as an engine returned it. */
export type EngineRow = Record<string, string | number>;

const INTEGER_COLUMNS = ["windows", "above", "sustained_episodes", "longest_run"];
const DOUBLE_COLUMNS = ["sum_p", "sum_p2"];

function normalised(row: Record<string, unknown>): EngineRow {
  const out: EngineRow = {};
  for (const [key, value] of Object.entries(row)) {
    if (INTEGER_COLUMNS.includes(key) || DOUBLE_COLUMNS.includes(key)) out[key] = Number(value);
    else out[key] = value === null ? "" : String(value);
  }
  return out;
}

/** The header of a CSV file (plain names, no quoting needed for the windows files used here). */
export function csvHeader(path: string): string[] {
  const first = readFileSync(path, "utf8").split(/\r?\n/, 1)[0]!;
  return first.replace(/^\uFEFF/, "").split(",");
}

// ---------------------------------------------------------------------------------------------
// DuckDB

export interface DuckDbRun {
  readonly rows: EngineRow[];
  /** The query's result as DuckDB writes it to CSV (COPY ... TO), for `build --sessions`. */
  readonly csvPath: string | null;
}

/**
 * Loads the CSV with read_csv, every column as VARCHAR (ids stay exactly as written), optionally
 * makes the construct columns DOUBLE (the numeric-column path of the query), runs the query and,
 * when asked, writes its result to a CSV file.
 */
export async function runDuckDb(
  csvPath: string,
  query: string,
  options: { doubleColumns?: readonly string[]; copyTo?: string } = {},
): Promise<DuckDbRun> {
  const instance = await DuckDBInstance.create(":memory:");
  const connection = await instance.connect();
  try {
    // A session time zone far from UTC: the query must not depend on it.
    await connection.run("SET TimeZone = 'Pacific/Chatham'");
    const path = csvPath.replaceAll("'", "''");
    await connection.run(
      `CREATE TABLE windows_text AS SELECT * FROM read_csv('${path}', all_varchar = true, header = true, delim = ',', quote = '"', escape = '"')`,
    );
    const doubles = new Set(options.doubleColumns ?? []);
    const columns = csvHeader(csvPath).map((c) =>
      doubles.has(c) ? `CAST(NULLIF(TRIM("${c}"), '') AS DOUBLE) AS "${c}"` : `"${c}"`,
    );
    await connection.run(`CREATE TABLE windows AS SELECT ${columns.join(", ")} FROM windows_text`);
    const reader = await connection.runAndReadAll(query);
    const rows = reader.getRowObjectsJS().map(normalised);
    let copied: string | null = null;
    if (options.copyTo !== undefined) {
      const body = query.replace(/;\s*$/, "");
      await connection.run(
        `COPY (\n${body}\n) TO '${options.copyTo.replaceAll("'", "''")}' (HEADER, DELIMITER ',')`,
      );
      copied = options.copyTo;
    }
    return { rows, csvPath: copied };
  } finally {
    connection.closeSync();
    instance.closeSync();
  }
}

// ---------------------------------------------------------------------------------------------
// PostgreSQL

const MISSING_POSTGRES =
  "PostgreSQL server programs (initdb, pg_ctl, postgres, psql) were not found in /usr/lib/postgresql/*/bin or on the PATH. Install Debian's postgresql package (apt-get install -y postgresql); .ci/run installs it when initdb is missing.";

/**
 * Debian installs the server programs in /usr/lib/postgresql/<major>/bin, off the PATH; the
 * newest there, else the folder of initdb on the PATH. ER_TEST_PG_BIN names another folder.
 */
function postgresBin(): string {
  const chosen = process.env.ER_TEST_PG_BIN;
  if (chosen !== undefined) {
    if (!existsSync(join(chosen, "initdb")))
      throw new Error(`${MISSING_POSTGRES} (ER_TEST_PG_BIN=${chosen})`);
    return chosen;
  }
  const root = "/usr/lib/postgresql";
  const versions = existsSync(root)
    ? readdirSync(root)
        .filter((v) => existsSync(join(root, v, "bin", "initdb")))
        .sort((a, b) => Number(b) - Number(a))
    : [];
  if (versions.length > 0) return join(root, versions[0]!, "bin");
  const which = spawnSync("sh", ["-c", "command -v initdb"], { encoding: "utf8" });
  if (which.status === 0 && which.stdout.trim() !== "") return join(which.stdout.trim(), "..");
  throw new Error(MISSING_POSTGRES);
}

/** Root may not run the server: run its programs as the postgres user the package creates. */
function serverUser(): { uid: number; gid: number; prefix: string[] } | null {
  if (process.getuid?.() !== 0) return null;
  const uid = spawnSync("id", ["-u", "postgres"], { encoding: "utf8" });
  const gid = spawnSync("id", ["-g", "postgres"], { encoding: "utf8" });
  if (uid.status !== 0 || gid.status !== 0)
    throw new Error(
      "running as root, and there is no postgres user to run the PostgreSQL server as (the server refuses root). Install Debian's postgresql package, which creates that user.",
    );
  return {
    uid: Number(uid.stdout.trim()),
    gid: Number(gid.stdout.trim()),
    prefix: ["runuser", "-u", "postgres", "--"],
  };
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.unref();
    server.on("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      const port = typeof address === "object" && address !== null ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

function check(result: ReturnType<typeof spawnSync>, what: string): string {
  if (result.error) throw new Error(`${what}: ${result.error.message}`);
  if (result.status !== 0)
    throw new Error(
      `${what} failed (exit ${result.status}):\n${String(result.stderr)}\n${String(result.stdout)}`,
    );
  return String(result.stdout);
}

export interface PostgresServer {
  readonly version: string;
  /** Creates `table` with every column of the CSV file as text and loads it with \copy. */
  loadCsv(table: string, csvPath: string): void;
  /** Runs SQL and returns its result rows (psql --csv). */
  rows(query: string): EngineRow[];
  /** Stops the server and removes its folder. */
  stop(): void;
}

/** initdb into a temporary folder, then postgres on a free loopback port with its socket there. */
export async function startPostgres(): Promise<PostgresServer> {
  const bin = postgresBin();
  const user = serverUser();
  // As root, the server's folder goes where the postgres user can reach it, whatever TMPDIR says.
  const base = mkdtempSync(join(user ? "/tmp" : tmpdir(), "er-pg-"));
  if (user) chownSync(base, user.uid, user.gid);
  const data = join(base, "data");
  const asServer = (program: string, args: string[]) => {
    const command = [...(user?.prefix ?? []), join(bin, program), ...args];
    return spawnSync(command[0]!, command.slice(1), { encoding: "utf8", cwd: base });
  };
  let started = false;
  const stop = () => {
    if (started) asServer("pg_ctl", ["-D", data, "-m", "immediate", "-w", "stop"]);
    started = false;
    rmSync(base, { recursive: true, force: true });
  };
  try {
    check(
      asServer("initdb", [
        "-D",
        data,
        "--auth=trust",
        "-U",
        "postgres",
        "-E",
        "UTF8",
        "--locale=C",
        "--no-sync",
      ]),
      "initdb",
    );
    const port = await freePort();
    const options = `-p ${port} -k ${base} -c listen_addresses=127.0.0.1 -c fsync=off`;
    check(
      asServer("pg_ctl", [
        "-D",
        data,
        "-l",
        join(base, "server.log"),
        "-o",
        options,
        "-w",
        "-t",
        "60",
        "start",
      ]),
      "pg_ctl start",
    );
    started = true;
    const psql = (args: string[], input?: string) =>
      check(
        spawnSync(
          join(bin, "psql"),
          [
            "-h",
            "127.0.0.1",
            "-p",
            String(port),
            "-U",
            "postgres",
            "-d",
            "postgres",
            "-X",
            "-q",
            "-v",
            "ON_ERROR_STOP=1",
            ...args,
          ],
          // A session time zone far from UTC: the query must not depend on it.
          { encoding: "utf8", input, env: { ...process.env, PGTZ: "Asia/Kathmandu" }, maxBuffer: 1 << 28 },
        ),
        "psql",
      );
    const version = psql(["-At", "-c", "SHOW server_version"]).trim();
    return {
      version,
      loadCsv(table, csvPath) {
        const columns = csvHeader(csvPath).map((c) => `"${c}" TEXT`);
        psql(["-c", `CREATE TABLE ${table} (${columns.join(", ")})`]);
        psql(["-c", `\\copy ${table} FROM '${csvPath}' WITH (FORMAT csv, HEADER true)`]);
      },
      rows(query) {
        const file = join(base, "query.sql");
        writeFileSync(file, query);
        const out = psql(["--csv", "-f", file]);
        return (parseCsv(out, { columns: true }) as Record<string, string>[]).map(normalised);
      },
      stop,
    };
  } catch (error) {
    const log = join(base, "server.log");
    const tail = existsSync(log) ? `\nserver log:\n${readFileSync(log, "utf8").slice(-2000)}` : "";
    stop();
    throw new Error(`could not start a PostgreSQL server for the test: ${(error as Error).message}${tail}`);
  }
}
