"use server";
import { generateIdFromEntropySize } from "lucia";
import { headers } from "next/headers";
import { redirect } from "next/navigation";
import { z } from "zod";
import { hashPassword, verifyAgainstDummy, verifyPassword } from "@/lib/auth/password";
import { endSession, startSession, writeActiveGroupCookie } from "@/lib/auth/session";
import { checkSignInAllowed, recordSignInAttempt } from "@/lib/auth/throttle";
import { recordAudit } from "@/lib/db/audit";
import { db } from "@/lib/db/knex";
import { signInSchema, signUpSchema, type ActionState } from "@/features/auth/schemas";

export type { ActionState } from "@/features/auth/schemas";

function fields(formData: FormData): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of formData.entries()) if (typeof value === "string") out[key] = value;
  return out;
}

function invalid(error: z.ZodError): ActionState {
  const flat = z.flattenError(error).fieldErrors as Record<string, string[] | undefined>;
  const fieldErrors: Record<string, string[]> = {};
  for (const [k, v] of Object.entries(flat)) if (v?.length) fieldErrors[k] = v;
  return { ok: false, message: "Check the fields marked below.", fieldErrors };
}

async function clientIp(): Promise<string> {
  const h = await headers();
  const forwarded = h.get("x-forwarded-for")?.split(",")[0]?.trim();
  return (forwarded || h.get("x-real-ip") || "unknown").slice(0, 64);
}

const isDuplicate = (err: unknown) =>
  typeof err === "object" && err !== null && "code" in err && err.code === "ER_DUP_ENTRY";

/** Signs in with e-mail and password; throttles repeated failures. Redirects to /sites on success. */
export async function signIn(_prev: ActionState | undefined, formData: FormData): Promise<ActionState> {
  const parsed = signInSchema.safeParse(fields(formData));
  if (!parsed.success) return invalid(parsed.error);
  const { email, password } = parsed.data;
  const ip = await clientIp();

  const verdict = await checkSignInAllowed(email, ip);
  if (!verdict.allowed) return { ok: false, message: verdict.message };

  const user = await db("users").where({ email }).first("id", "password_hash");
  const valid = user ? await verifyPassword(user.password_hash, password) : await verifyAgainstDummy(password);
  await recordSignInAttempt(email, ip, valid);
  if (!user || !valid) return { ok: false, message: "The e-mail address or the password is not right." };

  await startSession(user.id);
  redirect("/sites");
}

/** Creates a person, a new research group and their lead membership, then signs them in. */
export async function signUp(_prev: ActionState | undefined, formData: FormData): Promise<ActionState> {
  const parsed = signUpSchema.safeParse(fields(formData));
  if (!parsed.success) return invalid(parsed.error);
  const { email, password, displayName, groupName } = parsed.data;
  const taken: ActionState = {
    ok: false,
    message: "Check the fields marked below.",
    fieldErrors: { email: ["An account with this e-mail address already exists. Sign in instead."] },
  };

  if (await db("users").where({ email }).first("id")) return taken;
  const userId = generateIdFromEntropySize(10);
  const passwordHash = await hashPassword(password);
  let groupId: number;
  try {
    groupId = await db.transaction(async (trx) => {
      await trx("users").insert({ id: userId, email, display_name: displayName, password_hash: passwordHash });
      const [id] = await trx("research_groups").insert({ name: groupName });
      if (id === undefined) throw new Error("research_groups insert returned no id");
      await trx("memberships").insert({ user_id: userId, group_id: id, role: "lead" });
      await recordAudit({ groupId: null, userId, action: "user.sign_up", entityType: "user", entityId: userId }, trx);
      await recordAudit(
        { groupId: id, userId, action: "group.create", entityType: "research_group", entityId: id, detail: { name: groupName } },
        trx,
      );
      return id;
    });
  } catch (err) {
    // Two sign-ups racing for one address: the unique index decides.
    if (isDuplicate(err)) return taken;
    throw err;
  }

  await startSession(userId);
  await writeActiveGroupCookie(groupId);
  redirect("/sites");
}

/** Ends the session and returns to the sign-in page. */
export async function signOut(): Promise<void> {
  await endSession();
  redirect("/sign-in");
}
