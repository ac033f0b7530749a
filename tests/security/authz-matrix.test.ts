import { readdirSync } from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { DEFAULT_RULE_SET } from "@/lib/classify/rules";
import { db } from "@/lib/db/knex";
import { ensureActiveRuleSet } from "@/lib/evenings/rulesets";
import { enqueueJob } from "@/lib/jobs/queue";
import { createApiToken } from "@/lib/auth/tokens";
import { inviteMember } from "@/features/team/server/mutations";
import {
  addMember,
  clientFor,
  createSiteFor,
  createUser,
  createUserWithGroup,
  uniqueEmail,
  uniqueTag,
  type TestUser,
} from "@/tests/support/db";
import { FakeClient, formData, type Outcome } from "@/tests/support/next";
import { syntheticSiteFields } from "@/tests/support/sites";
import { insertEvenings } from "@/tests/features/review/fixtures";
import { syntheticCsv, uploadRequest } from "@/tests/features/imports/helpers";

/*
 * Authorisation matrix. The list of things to check is read from the app itself: every HTTP
 * method exported by app/**\/route.ts and every export of features/*\/server/actions.ts. Each is
 * called in-process against five callers: nobody signed in, a lead of ANOTHER group, and a
 * viewer, an analyst and a lead of the group that owns the data. The expectations are the
 * tables ROUTES and ACTIONS below; anything the app has that they do not name, or that they name
 * and the app no longer has, fails the first test. All rows are synthetic fixtures.
 */

const ROOT = path.resolve(__dirname, "../..");
const BASE = "http://localhost:3000";
const METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;
const WHO = ["anonymous", "other", "viewer", "analyst", "lead"] as const;
type Who = (typeof WHO)[number];

// --- what the app has -------------------------------------------------------------------

function routeFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const full = path.join(dir, e.name);
    if (e.isDirectory()) return routeFiles(full);
    return e.name === "route.ts" ? [full] : [];
  });
}

type Handler = (request: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;
type AnyAction = (...args: never[]) => Promise<unknown>;

async function discoverRoutes(): Promise<Map<string, Handler>> {
  const found = new Map<string, Handler>();
  for (const file of routeFiles(path.join(ROOT, "app")).sort()) {
    // app/(group)/api/x/route.ts -> /api/x (route groups do not appear in the URL)
    const url =
      "/" +
      path
        .relative(path.join(ROOT, "app"), path.dirname(file))
        .split(path.sep)
        .filter((s) => !/^\(.*\)$/.test(s))
        .join("/");
    const mod = (await import(file)) as Record<string, unknown>;
    for (const m of METHODS) {
      const h = mod[m];
      if (typeof h === "function") found.set(`${m} ${url}`, h as Handler);
    }
  }
  return found;
}

async function discoverActions(): Promise<Map<string, AnyAction>> {
  const found = new Map<string, AnyAction>();
  const features = readdirSync(path.join(ROOT, "features"), { withFileTypes: true }).filter((d) =>
    d.isDirectory(),
  );
  for (const f of features.map((d) => d.name).sort()) {
    const file = path.join(ROOT, "features", f, "server", "actions.ts");
    let mod: Record<string, unknown>;
    try {
      mod = (await import(file)) as Record<string, unknown>;
    } catch (err) {
      if (
        (err as { code?: string }).code === "ERR_MODULE_NOT_FOUND" ||
        /Failed to load|Cannot find/.test(String(err))
      )
        continue;
      throw err;
    }
    for (const [name, value] of Object.entries(mod)) {
      // A 'use server' file may export only async functions; anything else is a finding too.
      found.set(`${f}.${name}`, value as AnyAction);
    }
  }
  return found;
}

// --- the data each check runs against ----------------------------------------------------

type World = {
  tag: string;
  groupId: number;
  groupName: string;
  siteId: number;
  siteName: string;
  users: Record<Exclude<Who, "anonymous">, TestUser>;
  otherGroupId: number;
  extraMemberId: string;
  eveningId: number;
  eveningVersion: number;
  overriddenId: number;
  overriddenVersion: number;
  ruleSetId: number;
  jobId: number;
  pendingImportId: number;
  failedImportId: number;
  invitationId: number;
  leadTokenId: number;
};

/**
 * One research group with a member of each role, a site with evenings (one overridden), a rule
 * set, a job, two imports (one waiting for its overlap answer, one failed), an open invitation
 * and the lead's API token; and another group with its own lead. The group and site names carry
 * a marker that must never reach the other group's lead.
 */
async function makeWorld(): Promise<World> {
  const tag = uniqueTag();
  const { user: lead, group } = await createUserWithGroup({ role: "lead", groupName: `Hidden group ${tag}` });
  const viewer = await createUser();
  const analyst = await createUser();
  const extra = await createUser();
  await addMember(viewer.id, group.id, "viewer");
  await addMember(analyst.id, group.id, "analyst");
  await addMember(extra.id, group.id, "viewer");
  const other = await createUserWithGroup({ role: "lead", groupName: `Other group ${uniqueTag()}` });
  await createSiteFor(other.group.id, { name: `Other site ${uniqueTag()}` });

  const siteName = `Hidden site ${tag}`;
  const site = await createSiteFor(group.id, { name: siteName, notes: `Hidden note ${tag}` });
  const [eveningId, overriddenId] = await insertEvenings(site.id, [
    { date: "2024-06-03" },
    { date: "2024-06-04" },
  ]);
  if (eveningId === undefined || overriddenId === undefined) throw new Error("no evenings");
  await db("evenings")
    .where({ id: overriddenId })
    .update({
      final_label: "advective",
      label_source: "override",
      override_note: `Hidden override ${tag}`,
      version: db.raw("version + 1"),
    });
  const versions = await db("evenings")
    .whereIn("id", [eveningId, overriddenId])
    .select<Array<{ id: number; version: number }>>("id", "version");
  const versionOf = (id: number) => Number(versions.find((v) => v.id === id)?.version);

  const ruleSet = await ensureActiveRuleSet(site.id);
  const jobId = await enqueueJob({
    kind: "recompute",
    groupId: group.id,
    siteId: site.id,
    payload: {},
    createdBy: lead.id,
  });
  await db("jobs").where({ id: jobId }).update({ status: "done", phase: "done", finished_at: new Date() });
  const importRow = (status: "pending" | "failed", n: number) => ({
    site_id: site.id,
    sha256: `${tag}${String(n)}`.padEnd(64, "0"),
    original_name: `hidden-${tag}-${n}.csv`,
    size_bytes: 10,
    storage_key: `00/${tag}${n}`,
    options: JSON.stringify({}),
    status,
    created_by: lead.id,
    created_at: new Date(),
  });
  const [pendingImportId] = await db("imports").insert(importRow("pending", 1));
  const [failedImportId] = await db("imports").insert(importRow("failed", 2));

  const leadClient = await clientFor(lead, { groupId: group.id });
  const invited = await leadClient.call(() =>
    inviteMember(group.id, { email: uniqueEmail("invitee"), role: "viewer" }),
  );
  if (!invited.ok) throw new Error(`invitation fixture: ${invited.message}`);
  const token = await createApiToken(lead.id, `matrix ${tag}`);

  return {
    tag,
    groupId: group.id,
    groupName: group.name,
    siteId: site.id,
    siteName,
    users: { lead, viewer, analyst, other: other.user },
    otherGroupId: other.group.id,
    extraMemberId: extra.id,
    eveningId,
    eveningVersion: versionOf(eveningId),
    overriddenId,
    overriddenVersion: versionOf(overriddenId),
    ruleSetId: ruleSet.id,
    jobId,
    pendingImportId: Number(pendingImportId),
    failedImportId: Number(failedImportId),
    invitationId: invited.invitationId,
    leadTokenId: token.id,
  };
}

async function clientAs(w: World, who: Who): Promise<FakeClient> {
  if (who === "anonymous") return new FakeClient();
  return clientFor(w.users[who], { groupId: who === "other" ? w.otherGroupId : w.groupId });
}

// --- expectations -------------------------------------------------------------------------

/** Statuses in the order anonymous, other group's lead, viewer, analyst, lead. */
type Row = readonly [number, number, number, number, number];
const ANY_MEMBER: Row = [401, 404, 200, 200, 200];

/** A request with a JSON body, as the app's own fetches send it. */
const send = (method: "POST" | "PATCH", body: unknown): RequestInit => ({
  method,
  body: JSON.stringify(body),
  headers: { "content-type": "application/json" },
});

type RouteCase = {
  expect: Row;
  /** Changes data: run every caller against a fresh world so no answer depends on another. */
  mutates?: boolean;
  /** Path (with the query) and request options for this world. */
  call: (w: World) => { url: string; init?: RequestInit | (() => Request) };
};

/** A fresh name each time; the route takes the fields as JSON, the action as a form. */
const siteFields = () => syntheticSiteFields(`Matrix site ${uniqueTag()}`);

const siteBody = (w: World) => ({ groupId: w.groupId, ...siteFields() });

const ROUTES: Record<string, RouteCase> = {
  "GET /api/evenings/[eveningId]": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/evenings/${w.eveningId}` }),
  },
  "POST /api/evenings/[eveningId]/overrides": {
    expect: [401, 404, 403, 200, 200],
    mutates: true,
    call: (w) => ({
      url: `/api/evenings/${w.eveningId}/overrides`,
      init: send("POST", { label: "advective", note: "matrix check", version: w.eveningVersion }),
    }),
  },
  "POST /api/evenings/[eveningId]/revert": {
    expect: [401, 404, 403, 403, 200],
    mutates: true,
    call: (w) => ({
      url: `/api/evenings/${w.overriddenId}/revert`,
      init: send("POST", { version: w.overriddenVersion, note: "matrix check" }),
    }),
  },
  "POST /api/evenings/[eveningId]/reviewed": {
    expect: [401, 404, 403, 200, 200],
    mutates: true,
    call: (w) => ({
      url: `/api/evenings/${w.eveningId}/reviewed`,
      init: send("POST", { version: w.eveningVersion }),
    }),
  },
  "GET /api/groups/[groupId]/invitations": {
    expect: [401, 404, 403, 403, 200],
    call: (w) => ({ url: `/api/groups/${w.groupId}/invitations` }),
  },
  "POST /api/groups/[groupId]/invitations": {
    expect: [401, 404, 403, 403, 201],
    mutates: true,
    call: (w) => ({
      url: `/api/groups/${w.groupId}/invitations`,
      init: send("POST", { email: uniqueEmail("matrix"), role: "viewer" }),
    }),
  },
  "DELETE /api/groups/[groupId]/invitations/[invitationId]": {
    expect: [401, 404, 403, 403, 204],
    mutates: true,
    call: (w) => ({
      url: `/api/groups/${w.groupId}/invitations/${w.invitationId}`,
      init: { method: "DELETE" },
    }),
  },
  "POST /api/groups/[groupId]/invitations/[invitationId]/resend": {
    expect: [401, 404, 403, 403, 204],
    mutates: true,
    call: (w) => ({
      url: `/api/groups/${w.groupId}/invitations/${w.invitationId}/resend`,
      init: { method: "POST" },
    }),
  },
  "GET /api/groups/[groupId]/members": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/groups/${w.groupId}/members` }),
  },
  "PATCH /api/groups/[groupId]/members/[userId]": {
    expect: [401, 404, 403, 403, 204],
    mutates: true,
    call: (w) => ({
      url: `/api/groups/${w.groupId}/members/${w.extraMemberId}`,
      init: send("PATCH", { role: "analyst" }),
    }),
  },
  "DELETE /api/groups/[groupId]/members/[userId]": {
    expect: [401, 404, 403, 403, 204],
    mutates: true,
    call: (w) => ({ url: `/api/groups/${w.groupId}/members/${w.extraMemberId}`, init: { method: "DELETE" } }),
  },
  "GET /api/jobs/[jobId]": { expect: ANY_MEMBER, call: (w) => ({ url: `/api/jobs/${w.jobId}` }) },
  "POST /api/rule-sets/[ruleSetId]/activate": {
    expect: [401, 404, 403, 403, 202],
    mutates: true,
    call: (w) => ({
      url: `/api/rule-sets/${w.ruleSetId}/activate`,
      init: send("POST", { siteId: w.siteId }),
    }),
  },
  "POST /api/rule-sets/preview": {
    expect: [401, 404, 403, 200, 200],
    call: (w) => ({
      url: `/api/rule-sets/preview`,
      init: send("POST", {
        siteId: w.siteId,
        from: "2024-06-01",
        to: "2024-06-10",
        definition: DEFAULT_RULE_SET,
      }),
    }),
  },
  "GET /api/rule-sets": { expect: ANY_MEMBER, call: (w) => ({ url: `/api/rule-sets?groupId=${w.groupId}` }) },
  "POST /api/rule-sets": {
    expect: [401, 404, 403, 403, 201],
    mutates: true,
    call: (w) => ({
      url: `/api/rule-sets`,
      init: send("POST", {
        groupId: w.groupId,
        name: "Matrix version",
        comment: "matrix check of roles",
        definition: DEFAULT_RULE_SET,
      }),
    }),
  },
  "GET /api/seasons": { expect: ANY_MEMBER, call: (w) => ({ url: `/api/seasons?sites=${w.siteId}` }) },
  "GET /api/sites/[siteId]/anomalies": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/anomalies?from=2024-06-01&to=2024-06-30` }),
  },
  "GET /api/sites/[siteId]/evenings/queue": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/evenings/queue?from=2024-06-01&to=2024-06-30` }),
  },
  "GET /api/sites/[siteId]/evenings": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/evenings?from=2024-06-01&to=2024-06-30` }),
  },
  "GET /api/sites/[siteId]/export": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/export?from=2024-06-01&to=2024-06-30` }),
  },
  "POST /api/sites/[siteId]/imports/[importId]/overlap": {
    expect: [401, 404, 403, 200, 200],
    mutates: true,
    call: (w) => ({
      url: `/api/sites/${w.siteId}/imports/${w.pendingImportId}/overlap`,
      init: send("POST", { choice: "cancel" }),
    }),
  },
  "GET /api/sites/[siteId]/imports/[importId]/rejected": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/imports/${w.failedImportId}/rejected` }),
  },
  "GET /api/sites/[siteId]/imports/[importId]": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/imports/${w.failedImportId}` }),
  },
  "DELETE /api/sites/[siteId]/imports/[importId]": {
    expect: [401, 404, 403, 200, 200],
    mutates: true,
    call: (w) => ({ url: `/api/sites/${w.siteId}/imports/${w.failedImportId}`, init: { method: "DELETE" } }),
  },
  "GET /api/sites/[siteId]/imports": {
    expect: ANY_MEMBER,
    call: (w) => ({ url: `/api/sites/${w.siteId}/imports` }),
  },
  "POST /api/sites/[siteId]/imports": {
    expect: [401, 404, 403, 202, 202],
    mutates: true,
    call: (w) => ({
      url: `/api/sites/${w.siteId}/imports`,
      // a different file per caller, so none is refused as already imported
      init: () => uploadRequest(w.siteId, syntheticCsv(2, { seed: Math.floor(Math.random() * 1e6) })),
    }),
  },
  "GET /api/sites/[siteId]": { expect: ANY_MEMBER, call: (w) => ({ url: `/api/sites/${w.siteId}` }) },
  "PATCH /api/sites/[siteId]": {
    expect: [401, 404, 403, 403, 200],
    mutates: true,
    call: (w) => ({
      url: `/api/sites/${w.siteId}`,
      init: send("PATCH", { notes: "changed by the matrix" }),
    }),
  },
  "DELETE /api/sites/[siteId]": {
    expect: [401, 404, 403, 403, 204],
    mutates: true,
    call: (w) => ({ url: `/api/sites/${w.siteId}`, init: { method: "DELETE" } }),
  },
  "GET /api/sites": { expect: ANY_MEMBER, call: (w) => ({ url: `/api/sites?groupId=${w.groupId}` }) },
  "POST /api/sites": {
    expect: [401, 404, 403, 403, 201],
    mutates: true,
    call: (w) => ({ url: `/api/sites`, init: send("POST", siteBody(w)) }),
  },
};

/**
 * What an action ended with: "signin" (redirected to the sign-in page), "ok" (a success state
 * or a redirect elsewhere), "refused" (a state with ok: false and a message), or Next's
 * notFound / forbidden / unauthorized.
 */
type ActionResult = "signin" | "ok" | "refused" | "notFound" | "forbidden" | "unauthorized";
type ActionRow = readonly [ActionResult, ActionResult, ActionResult, ActionResult, ActionResult];

type ActionCase = {
  expect: ActionRow;
  /** Public actions (sign-in, sign-up, links): the answer does not depend on who asks. */
  public?: true;
  run: (w: World, who: Who, action: AnyAction) => Promise<unknown>;
  /** Further checks after the call (e.g. that nothing of the group was touched). */
  after?: (w: World, who: Who, client: FakeClient, outcome: Outcome<unknown>) => Promise<void>;
};

const LEAD_ONLY: ActionRow = ["signin", "refused", "refused", "refused", "ok"];
const ANALYST_UP: ActionRow = ["refused", "refused", "refused", "ok", "ok"];
const SIGNED_IN: ActionRow = ["signin", "ok", "ok", "ok", "ok"];
const EMPTY = { ok: false };

// Calls with loose types: bound arguments reach actions from the client as plain values too.
const call = (action: AnyAction, ...args: unknown[]) =>
  (action as (...a: unknown[]) => Promise<unknown>)(...args);

const siteForm = () => formData(siteFields());

const ACTIONS: Record<string, ActionCase> = {
  "account.createTokenAction": {
    expect: SIGNED_IN,
    run: (_w, _who, a) => call(a, EMPTY, formData({ name: "matrix" })),
  },
  // Everyone tries to revoke the group lead's token: only its owner may.
  "account.revokeTokenAction": {
    expect: ["signin", "refused", "refused", "refused", "ok"],
    run: (w, _who, a) => call(a, EMPTY, formData({ tokenId: w.leadTokenId })),
  },
  "auth.signIn": {
    expect: ["ok", "ok", "ok", "ok", "ok"],
    public: true,
    run: async (w, who, a) => {
      const person = who === "anonymous" ? await createUser() : w.users[who];
      return call(a, undefined, formData({ email: person.email, password: person.password }));
    },
  },
  "auth.signUp": {
    expect: ["ok", "ok", "ok", "ok", "ok"],
    public: true,
    run: (_w, _who, a) =>
      call(
        a,
        undefined,
        formData({
          email: uniqueEmail("signup"),
          password: "a-long-enough-password",
          displayName: "Matrix Person",
          groupName: `Matrix ${uniqueTag()}`,
        }),
      ),
  },
  "auth.signOut": {
    expect: ["signin", "signin", "signin", "signin", "signin"],
    public: true,
    run: (_w, _who, a) => call(a),
  },
  "imports.resolveOverlapAction": {
    expect: ANALYST_UP,
    run: (w, _who, a) => call(a, w.siteId, w.pendingImportId, "cancel"),
  },
  "imports.deleteImportAction": {
    expect: ANALYST_UP,
    run: (w, _who, a) => call(a, w.siteId, w.failedImportId, false),
  },
  "imports.recomputeAction": {
    expect: ANALYST_UP,
    run: (w, _who, a) =>
      call(a, { ok: true }, formData({ siteId: w.siteId, from: "2024-06-01", to: "2024-06-30" })),
  },
  "notices.savePreferencesAction": {
    expect: SIGNED_IN,
    run: (_w, _who, a) => call(a, { ok: true }, formData({ importNotices: "on" })),
  },
  "recovery.requestResetAction": {
    expect: ["ok", "ok", "ok", "ok", "ok"],
    public: true,
    run: (w, _who, a) => call(a, { ok: true }, formData({ email: w.users.viewer.email })),
  },
  // The token is the credential; an unknown one is refused for everybody alike.
  "recovery.resetPasswordAction": {
    expect: ["refused", "refused", "refused", "refused", "refused"],
    public: true,
    run: (_w, _who, a) =>
      call(
        a,
        "not-a-real-token",
        { ok: true },
        formData({ password: "a-long-enough-password", confirm: "a-long-enough-password" }),
      ),
  },
  "shell.switchGroupAction": {
    expect: ["signin", "ok", "ok", "ok", "ok"],
    run: (w, _who, a) => call(a, formData({ groupId: w.groupId })),
    // The other group's lead is sent to /sites as everyone, but does not enter the group.
    after: async (w, who, client) => {
      const active = client.cookies.get("gloaming_group")?.value;
      if (who === "other") expect(active).toBe(String(w.otherGroupId));
      else if (who !== "anonymous") expect(active).toBe(String(w.groupId));
    },
  },
  "sites.createSiteAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => {
      const fd = siteForm();
      fd.set("groupId", String(w.groupId));
      return call(a, { ok: true }, fd);
    },
  },
  "sites.updateSiteAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => call(a, w.siteId, { ok: true }, siteForm()),
  },
  "sites.deleteSiteAction": { expect: LEAD_ONLY, run: (w, _who, a) => call(a, w.siteId) },
  "team.inviteAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) =>
      call(a, w.groupId, { ok: true }, formData({ email: uniqueEmail("invite"), role: "viewer" })),
  },
  "team.resendInvitationAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => call(a, w.groupId, w.invitationId),
  },
  "team.revokeInvitationAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => call(a, w.groupId, w.invitationId),
  },
  "team.changeRoleAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => call(a, w.groupId, w.extraMemberId, { ok: true }, formData({ role: "analyst" })),
  },
  "team.removeMemberAction": { expect: LEAD_ONLY, run: (w, _who, a) => call(a, w.groupId, w.extraMemberId) },
  "team.setMemberRoleAction": {
    expect: LEAD_ONLY,
    run: (w, _who, a) => call(a, w.groupId, w.extraMemberId, "analyst"),
  },
  "team.acceptInvitationAction": {
    expect: ["refused", "refused", "refused", "refused", "refused"],
    public: true,
    run: (_w, _who, a) =>
      call(
        a,
        "not-a-real-token",
        { ok: true },
        formData({ displayName: "Matrix", password: "a-long-enough-password" }),
      ),
  },
};

/** The export of the app a table row names; a missing one fails the check that asked for it. */
function exported<T>(found: Map<string, T>, key: string): T {
  const value = found.get(key);
  expect(value, `${key} exists`).toBeDefined();
  if (value === undefined) throw new Error(`${key} is not exported by the app`);
  return value;
}

function classify(outcome: Outcome<unknown>): ActionResult {
  switch (outcome.kind) {
    case "redirect":
      return outcome.location === "/sign-in" ? "signin" : "ok";
    case "value": {
      const v = outcome.value as { ok?: boolean } | undefined;
      return v === undefined || v.ok === true ? "ok" : "refused";
    }
    default:
      return outcome.kind;
  }
}

// --- the tests ------------------------------------------------------------------------------

let routes: Map<string, Handler>;
let actions: Map<string, AnyAction>;
let shared: World;

beforeAll(async () => {
  routes = await discoverRoutes();
  actions = await discoverActions();
  shared = await makeWorld();
}, 120_000);

/** The params of a route pattern, taken from the concrete URL. */
function paramsOf(pattern: string, url: string): Record<string, string> {
  const p = pattern.split(" ")[1]?.split("/") ?? [];
  const u = new URL(url, BASE).pathname.split("/");
  const out: Record<string, string> = {};
  p.forEach((seg, i) => {
    const m = /^\[(.+)\]$/.exec(seg);
    if (m?.[1]) out[m[1]] = u[i] ?? "";
  });
  return out;
}

describe("the matrix covers the app", () => {
  test("every route handler and server action is in the table, and the table names nothing else", () => {
    const routeKeys = [...routes.keys()].sort();
    const actionKeys = [...actions.keys()].sort();
    expect(
      routeKeys.filter((k) => !(k in ROUTES)),
      "route handlers missing from ROUTES",
    ).toEqual([]);
    expect(
      Object.keys(ROUTES).filter((k) => !routes.has(k)),
      "ROUTES names handlers that no longer exist",
    ).toEqual([]);
    expect(
      actionKeys.filter((k) => !(k in ACTIONS)),
      "server actions missing from ACTIONS",
    ).toEqual([]);
    expect(
      Object.keys(ACTIONS).filter((k) => !actions.has(k)),
      "ACTIONS names actions that no longer exist",
    ).toEqual([]);
    for (const [k, a] of actions)
      expect(typeof a, `${k} is exported from a 'use server' file`).toBe("function");
    // Printed so the README figure can be checked against a run.
    console.info(
      `authorisation matrix: ${routes.size} route handlers and ${actions.size} actions x ${WHO.length} callers`,
    );
  });
});

describe.each(Object.entries(ROUTES))("%s", (key, spec) => {
  test.each(WHO.map((who, i) => [who, spec.expect[i] ?? 0] as const))(
    "%s -> %i",
    { timeout: 60_000 },
    async (who, status) => {
      const handler = exported(routes, key);
      const w = spec.mutates ? await makeWorld() : shared;
      const client = await clientAs(w, who);
      const { url, init } = spec.call(w);
      const request = typeof init === "function" ? init() : new Request(`${BASE}${url}`, init);
      const res = await client.call(() => handler(request, { params: Promise.resolve(paramsOf(key, url)) }));
      const text = res.headers.get("content-type")?.includes("zip") ? "" : await res.text();
      expect(res.status, `${who} ${key}: ${text.slice(0, 300)}`).toBe(status);
      if (status >= 400) {
        // Refusals never carry the group's data, and name the reason in the usual shape.
        expect(text).not.toContain(w.tag);
        expect((JSON.parse(text) as { error?: { code?: string } }).error?.code).toBeTruthy();
      }
    },
  );
});

describe.each(Object.entries(ACTIONS))("action %s", (key, spec) => {
  test.each(WHO.map((who, i) => [who, spec.expect[i]] as const))(
    "%s -> %s",
    { timeout: 60_000 },
    async (who, expected) => {
      const action = exported(actions, key);
      const w = await makeWorld();
      const client = await clientAs(w, who);
      const outcome = await client.run(() => spec.run(w, who, action));
      expect(classify(outcome), `${who} ${key}: ${JSON.stringify(outcome).slice(0, 300)}`).toBe(expected);
      if (who === "other" || (expected === "refused" && !spec.public))
        expect(JSON.stringify(outcome)).not.toContain(w.tag);
      await spec.after?.(w, who, client, outcome);
    },
  );
});
