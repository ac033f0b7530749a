import { spawnSync } from "node:child_process";
import { describe, expect, inject, it } from "vitest";
import { authenticateRequest, listApiTokens } from "@/lib/auth/tokens";
import { createUser } from "@/tests/support/db";

function token(...args: string[]) {
  const r = spawnSync(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/token.ts", ...args], {
    encoding: "utf8",
    env: { ...process.env, DATABASE_URL: inject("databaseUrl") },
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("npm run token", () => {
  it("creates a token for an operator, printing only the secret on stdout; lists and revokes it", async () => {
    const user = await createUser();
    const made = token("create", "--email", user.email.toUpperCase(), "--name", "tower computer");
    expect(made.code).toBe(0);
    const secret = made.stdout.trim();
    expect(secret).toMatch(/^glm_[A-Za-z0-9_-]{43}$/);
    expect(made.stderr).toMatch(/shown only now/);
    const req = new Request("http://localhost/", { headers: { authorization: `Bearer ${secret}` } });
    expect((await authenticateRequest(req))?.user.id).toBe(user.id);

    const [t] = await listApiTokens(user.id);
    const listed = token("list", "--email", user.email);
    expect(listed.code).toBe(0);
    expect(listed.stdout).toContain(`${t?.id}\tlive`);
    expect(listed.stdout).not.toContain(secret);

    expect(token("revoke", "--email", user.email, "--id", String(t?.id)).code).toBe(0);
    expect(await authenticateRequest(req)).toBeNull();
    expect(token("revoke", "--email", user.email, "--id", String(t?.id)).code).toBe(2);
  }, 60_000);

  it("answers unknown accounts and bad usage with exit code 2 and a message", () => {
    const r = token("create", "--email", "nobody@example.test", "--name", "x");
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no account with e-mail nobody@example.test/);
    expect(r.stdout).toBe("");
    expect(token("create", "--email", "nobody@example.test").code).toBe(2);
    expect(token().code).toBe(2);
  }, 60_000);
});
