/*
 * Fixtures against this run's real database (see tests/global-setup.ts). Every helper makes
 * unique rows, so test files need no cleanup and can run in parallel.
 */
import { randomBytes } from "node:crypto";
import { generateIdFromEntropySize } from "lucia";
import { lucia } from "@/lib/auth/lucia";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import type { SiteRow } from "@/lib/db/tables";
import { seedDemoScenario } from "@/db/seeds/01_demo_scenario";
import { FakeClient } from "@/tests/support/next";

export const TEST_PASSWORD = "correct-horse-battery";

export type TestUser = { id: string; email: string; displayName: string; password: string };
export type TestGroup = { id: number; name: string };
export type { SiteRow };

const hashes = new Map<string, Promise<string>>();
const cachedHash = (password: string) => {
  let h = hashes.get(password);
  if (!h) hashes.set(password, (h = hashPassword(password)));
  return h;
};

/** A short random tag for unique names. */
export function uniqueTag(): string {
  return randomBytes(4).toString("hex");
}

/** A unique, lower-case e-mail address under the reserved .test domain. */
export function uniqueEmail(prefix = "person"): string {
  return `${prefix}-${uniqueTag()}@example.test`;
}

export async function createUser(opts: { email?: string; password?: string; displayName?: string } = {}): Promise<TestUser> {
  const user: TestUser = {
    id: generateIdFromEntropySize(10),
    email: (opts.email ?? uniqueEmail()).toLowerCase(),
    displayName: opts.displayName ?? "Test Person",
    password: opts.password ?? TEST_PASSWORD,
  };
  await db("users").insert({
    id: user.id,
    email: user.email,
    display_name: user.displayName,
    password_hash: await cachedHash(user.password),
  });
  return user;
}

export async function createGroup(name = `Test group ${uniqueTag()}`): Promise<TestGroup> {
  const [id] = await db("research_groups").insert({ name });
  if (id === undefined) throw new Error("no id");
  return { id, name };
}

export async function addMember(userId: string, groupId: number, role: Role): Promise<void> {
  await db("memberships").insert({ user_id: userId, group_id: groupId, role });
}

/** A new person who is `role` (default lead) in a new group. */
export async function createUserWithGroup(
  opts: { role?: Role; groupName?: string; email?: string } = {},
): Promise<{ user: TestUser; group: TestGroup; role: Role }> {
  const role = opts.role ?? "lead";
  const user = await createUser({ email: opts.email });
  const group = await createGroup(opts.groupName);
  await addMember(user.id, group.id, role);
  return { user, group, role };
}

/** A valid site in `groupId`; override any column. */
export async function createSiteFor(groupId: number, overrides: Partial<Omit<SiteRow, "id" | "group_id">> = {}): Promise<SiteRow> {
  const [id] = await db("sites").insert({
    group_id: groupId,
    name: `Test site ${uniqueTag()}`,
    latitude: 45.5,
    longitude: 8.25,
    elevation_m: 400,
    measurement_height_m: 30,
    canopy_height_m: 20,
    displacement_height_m: null,
    utc_offset_hours: 1,
    notes: null,
    ...overrides,
  });
  const site = await db("sites").where({ id }).first();
  if (!site) throw new Error("site insert returned no row");
  return site;
}

/** Creates a lucia session for `userId` and returns the cookie a browser would send. */
export async function createSessionFor(userId: string): Promise<{ sessionId: string; cookieName: string; cookieValue: string }> {
  const session = await lucia.createSession(userId, {});
  const cookie = lucia.createSessionCookie(session.id);
  return { sessionId: session.id, cookieName: cookie.name, cookieValue: cookie.value };
}

/** A FakeClient already signed in as `user` (optionally with an active group cookie). */
export async function clientFor(user: { id: string }, opts: { ip?: string; groupId?: number } = {}): Promise<FakeClient> {
  const { cookieName, cookieValue } = await createSessionFor(user.id);
  const client = new FakeClient({ ip: opts.ip });
  client.cookies.set(cookieName, cookieValue);
  if (opts.groupId !== undefined) client.cookies.set("gloaming_group", String(opts.groupId));
  return client;
}

/** Seeds the demo scenario into this run's database (idempotent); returns the demo group id. */
export function seedDemo(): Promise<number> {
  return seedDemoScenario(db);
}
