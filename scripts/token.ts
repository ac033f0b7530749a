/*
 * Personal API tokens for operators:
 *   npm run --silent token -- create --email ADDRESS --name LABEL   prints the secret (once)
 *   npm run --silent token -- list --email ADDRESS
 *   npm run --silent token -- revoke --email ADDRESS --id N
 * The secret alone goes to stdout, so `TOKEN=$(npm run --silent token -- create ...)` works;
 * everything else goes to stderr.
 */
import { parseArgs } from "node:util";
import { TokenError, createApiToken, listApiTokens, revokeApiToken } from "@/lib/auth/tokens";
import { closeDb, db } from "@/lib/db/knex";

const USAGE = `usage:
  token create --email ADDRESS --name LABEL
  token list   --email ADDRESS
  token revoke --email ADDRESS --id N`;

class UsageError extends Error {}

async function userIdFor(email: string | undefined): Promise<string> {
  if (!email) throw new UsageError("--email is required");
  const [rows] = (await db.raw("SELECT id FROM users WHERE email = ?", [email.trim().toLowerCase()])) as [Array<{ id: string }>];
  const id = rows[0]?.id;
  if (!id) throw new UsageError(`no account with e-mail ${email}`);
  return id;
}

const iso = (d: Date | null) => (d ? d.toISOString().replace(/\.\d{3}Z$/, "Z") : "-");

async function main(argv: string[]): Promise<number> {
  const { positionals, values } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: { email: { type: "string" }, name: { type: "string" }, id: { type: "string" }, help: { type: "boolean", short: "h" } },
  });
  const command = positionals[0];
  if (values.help || !command) {
    console.error(USAGE);
    return values.help ? 0 : 2;
  }
  switch (command) {
    case "create": {
      const userId = await userIdFor(values.email);
      if (!values.name) throw new UsageError("--name is required");
      const t = await createApiToken(userId, values.name);
      console.error(`token ${t.id} "${t.name}" created for ${values.email}; it is shown only now:`);
      console.log(t.secret);
      return 0;
    }
    case "list": {
      const tokens = await listApiTokens(await userIdFor(values.email));
      if (tokens.length === 0) console.error("no tokens");
      for (const t of tokens)
        console.log(
          [t.id, t.revokedAt ? "revoked" : "live", `created ${iso(t.createdAt)}`, `last used ${iso(t.lastUsedAt)}`, t.name].join("\t"),
        );
      return 0;
    }
    case "revoke": {
      const userId = await userIdFor(values.email);
      const id = Number(values.id);
      if (!Number.isSafeInteger(id) || id <= 0) throw new UsageError("--id N is required (see `token list`)");
      if (!(await revokeApiToken(userId, id))) throw new UsageError(`no live token ${id} for ${values.email}`);
      console.error(`token ${id} revoked`);
      return 0;
    }
    default:
      throw new UsageError(`unknown command "${command}"`);
  }
}

void main(process.argv.slice(2))
  .then(
    (code) => code,
    (err: unknown) => {
      if (err instanceof UsageError || err instanceof TokenError) {
        console.error(`token: ${err.message}`);
        if (err instanceof UsageError) console.error(USAGE);
        return 2;
      }
      if (err instanceof TypeError && "code" in err && String(err.code).startsWith("ERR_PARSE_ARGS")) {
        console.error(`token: ${err.message}\n${USAGE}`);
        return 2;
      }
      console.error(`token: ${err instanceof Error ? err.message : String(err)}`);
      return 1;
    },
  )
  .then(async (code) => {
    await closeDb().catch(() => undefined);
    process.exit(code);
  });
