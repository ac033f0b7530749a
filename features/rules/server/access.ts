import "server-only";
import { db } from "@/lib/db/knex";
import type { SiteRow } from "@/lib/db/tables";
import { siteParamsOf } from "@/lib/evenings/recompute";
import { AuthError, type SessionUser } from "@/lib/auth/session";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";
import type { SiteParams } from "@/lib/classify/site";

export type RulesSite = SiteParams & { id: number; groupId: number; name: string };

/** The caller's role in a group: not a member -> not_found, below `minimum` -> forbidden. */
export async function groupRole(user: SessionUser, groupId: number, minimum: Role): Promise<Role> {
  const m: { role: string } | undefined = await db("memberships")
    .where({ user_id: user.id, group_id: groupId })
    .first("role");
  if (!m || !isRole(m.role)) throw new AuthError("not_found");
  if (!roleAtLeast(m.role, minimum)) throw new AuthError("forbidden");
  return m.role;
}

/** A site the caller may use at `minimum`, with the parameters the classifier needs. */
export async function rulesSite(
  user: SessionUser,
  siteId: number,
  minimum: Role,
): Promise<{ site: RulesSite; role: Role }> {
  const r = await db("sites").where({ id: siteId }).first<SiteRow | undefined>();
  if (!r) throw new AuthError("not_found");
  const role = await groupRole(user, r.group_id, minimum);
  return {
    role,
    site: {
      id: r.id,
      groupId: r.group_id,
      name: r.name,
      ...siteParamsOf(r),
    },
  };
}

/** A positive integer id from a route segment; anything else names nothing (404). */
export function idParam(raw: string): number {
  const n = /^\d{1,12}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(n) || n <= 0) throw new AuthError("not_found");
  return n;
}
