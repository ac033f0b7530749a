import { describe, expect, test } from "vitest";
import { isRole, roleAtLeast, type Role } from "@/lib/auth/roles";

describe("roleAtLeast", () => {
  // lead > analyst > viewer (product rule, docs/product.md)
  test.each<[Role, Role, boolean]>([
    ["lead", "lead", true],
    ["lead", "analyst", true],
    ["lead", "viewer", true],
    ["analyst", "lead", false],
    ["analyst", "analyst", true],
    ["analyst", "viewer", true],
    ["viewer", "lead", false],
    ["viewer", "analyst", false],
    ["viewer", "viewer", true],
  ])("%s at least %s: %s", (role, min, expected) => {
    expect(roleAtLeast(role, min)).toBe(expected);
  });

  test("isRole accepts the three roles only", () => {
    expect(["lead", "analyst", "viewer"].every(isRole)).toBe(true);
    expect(isRole("admin")).toBe(false);
    expect(isRole(undefined)).toBe(false);
  });
});
