/** A member's role in a research group, from most to least privileged. */
export type Role = "lead" | "analyst" | "viewer";

export const ROLES: readonly Role[] = ["lead", "analyst", "viewer"];

const rank: Record<Role, number> = { lead: 3, analyst: 2, viewer: 1 };

/** True when `role` grants at least what `min` grants (lead > analyst > viewer). */
export function roleAtLeast(role: Role, min: Role): boolean {
  return rank[role] >= rank[min];
}

/** Narrows an unknown value (e.g. a database enum) to a Role. */
export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}
