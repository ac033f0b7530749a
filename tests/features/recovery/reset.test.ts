import { describe, expect, test } from "vitest";
import { signIn } from "@/features/auth/server/actions";
import { getCurrentSession } from "@/lib/auth/session";
import { db } from "@/lib/db/knex";
import { env } from "@/lib/env";
import { RESET_REQUESTED_MESSAGE } from "@/features/recovery/schemas";
import { requestResetAction, resetPasswordAction } from "@/features/recovery/server/actions";
import { clientFor, createUser, uniqueEmail } from "@/tests/support/db";
import { FakeClient, formData } from "@/tests/support/next";
import { deliverFor, linkIn, tokenOf } from "@/tests/support/mail";

const request = (email: string) => new FakeClient().call(() => requestResetAction({ ok: true }, formData({ email })));

describe("password reset", () => {
  test("the answer is the same whether or not the address has an account; only an account gets mail", async () => {
    const user = await createUser();
    const unknown = uniqueEmail("nobody");
    const known = await request(user.email.toUpperCase());
    const missing = await request(unknown);
    expect(known).toEqual({ ok: true, message: RESET_REQUESTED_MESSAGE });
    expect(missing).toEqual(known);
    expect(await deliverFor(unknown)).toHaveLength(0);
    const mails = await deliverFor(user.email);
    expect(mails).toHaveLength(1);
    expect(mails[0]?.subject).toBe("Reset your Gloaming password");
    expect(linkIn(mails[0]!.text, "/reset-password/").origin).toBe(new URL(env.APP_URL).origin);
  });

  test("the link sets a new password once, signs out every other session and signs this browser in", async () => {
    const user = await createUser();
    const laptop = await clientFor(user);
    const phone = await clientFor(user);
    expect(await laptop.call(() => getCurrentSession())).not.toBeNull();

    await request(user.email);
    const token = tokenOf(linkIn((await deliverFor(user.email))[0]!.text, "/reset-password/"));
    const browser = new FakeClient();
    const outcome = await browser.run(() =>
      resetPasswordAction(token, { ok: true }, formData({ password: "a-brand-new-password", confirm: "a-brand-new-password" })),
    );
    expect(outcome).toEqual({ kind: "redirect", location: "/sites" });
    expect((await browser.call(() => getCurrentSession()))?.user.id).toBe(user.id);
    expect(await laptop.call(() => getCurrentSession())).toBeNull();
    expect(await phone.call(() => getCurrentSession())).toBeNull();
    expect(await db("user_sessions").where({ user_id: user.id }).count({ n: "*" }).first()).toEqual({ n: 1 });

    // Old password no longer works, the new one does.
    const old = await new FakeClient({ ip: "198.51.100.77" }).call(() => signIn(undefined, formData({ email: user.email, password: user.password })));
    expect(old.ok).toBe(false);
    const fresh = await new FakeClient({ ip: "198.51.100.77" }).run(() =>
      signIn(undefined, formData({ email: user.email, password: "a-brand-new-password" })),
    );
    expect(fresh).toEqual({ kind: "redirect", location: "/sites" });

    // Used link refused.
    const again = await new FakeClient().call(() =>
      resetPasswordAction(token, { ok: true }, formData({ password: "yet-another-password", confirm: "yet-another-password" })),
    );
    expect(again).toMatchObject({ ok: false, message: expect.stringMatching(/used already or has expired/) });
    expect(await db("audit_log").where({ user_id: user.id, action: "user.password_reset" }).count({ n: "*" }).first()).toEqual({ n: 1 });
  });

  test("an expired link is refused and the password stays", async () => {
    const user = await createUser();
    await request(user.email);
    const token = tokenOf(linkIn((await deliverFor(user.email))[0]!.text, "/reset-password/"));
    const row = await db("password_resets").where({ user_id: user.id }).first<{ expires_at: Date; created_at: Date }>();
    expect((row.expires_at.getTime() - row.created_at.getTime()) / 60_000).toBeCloseTo(60, 0);
    await db("password_resets").where({ user_id: user.id }).update({ expires_at: new Date(Date.now() - 1000) });
    const before = await db("users").where({ id: user.id }).first("password_hash");
    const state = await new FakeClient().call(() =>
      resetPasswordAction(token, { ok: true }, formData({ password: "a-brand-new-password", confirm: "a-brand-new-password" })),
    );
    expect(state.ok).toBe(false);
    expect(await db("users").where({ id: user.id }).first("password_hash")).toEqual(before);
  });

  test("mismatched or short passwords and made-up tokens are refused", async () => {
    const mismatch = await new FakeClient().call(() =>
      resetPasswordAction("x".repeat(43), { ok: true }, formData({ password: "a-long-password", confirm: "another-one" })),
    );
    expect(mismatch.fieldErrors?.confirm).toEqual(["The two passwords differ."]);
    const madeUp = await new FakeClient().call(() =>
      resetPasswordAction("x".repeat(43), { ok: true }, formData({ password: "a-long-password", confirm: "a-long-password" })),
    );
    expect(madeUp.ok).toBe(false);
  });

  test("repeated requests send at most three mails an hour", async () => {
    const user = await createUser();
    for (let i = 0; i < 5; i++) await request(user.email);
    expect(await deliverFor(user.email)).toHaveLength(3);
  });
});
