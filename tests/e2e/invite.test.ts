import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { DEMO_GROUP_NAME } from "@/lib/demo/scenario";
import { runOutbox } from "@/lib/mail/outbox";
import { seedDemo, uniqueEmail } from "@/tests/support/db";
import { launchBrowser, screenshot, signInAs, startApp, type BrowserSession, type RunningApp } from "@/tests/support/browser";
import { caughtFor, deliverFor, linkIn } from "@/tests/support/mail";
import type { CaughtMessage } from "@/lib/mail/catcher";

/*
 * The demo lead invites someone on the Team page; the outbox loop (as the worker runs it)
 * delivers the mail to the local catcher; the invitation is read from there, and the invitee
 * opens the link, creates an account, and later signs in with it.
 */

let app: RunningApp;
let browser: BrowserSession;
const stopOutbox = new AbortController();
let outbox: Promise<void>;

beforeAll(async () => {
  await seedDemo();
  app = await startApp();
  browser = await launchBrowser();
  outbox = runOutbox({ signal: stopOutbox.signal, pollMs: 200 });
});

afterAll(async () => {
  stopOutbox.abort();
  await outbox;
  await browser?.close();
  await app?.stop();
});

// The loop polls every 200 ms but backs off after a failed round; on a loaded machine the mail
// can take its time, so wait up to 90 s and, after 10 s, deliver this address's mail directly too.
async function waitForMail(address: string): Promise<CaughtMessage> {
  for (let i = 0; i < 450; i++) {
    const [first] = await caughtFor(address);
    if (first) return first;
    if (i >= 50 && i % 25 === 0) await deliverFor(address);
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail for ${address} reached the catcher`);
}

describe("inviting a new member", () => {
  test("the demo lead invites, the invitee accepts from the caught mail and signs in", { timeout: 240_000 }, async () => {
    const { page, context } = browser;
    const invitee = uniqueEmail("new-member");

    await signInAs(page, app.url, "lead@demo.gloaming.test");

    await page.getByRole("link", { name: /Team/ }).first().click();
    await page.getByRole("heading", { level: 1, name: "Team" }).waitFor();
    await page.getByLabel("E-mail address").fill(invitee);
    await page.getByLabel("Role", { exact: true }).selectOption("viewer");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await page.getByRole("status").filter({ hasText: `Invitation sent to ${invitee}` }).waitFor();
    await page.getByText(invitee).first().waitFor();

    const mail = await waitForMail(invitee);
    expect(mail.subject).toBe(`Invitation to ${DEMO_GROUP_NAME} on Gloaming`);
    const link = linkIn(mail.text, "/invitations/");
    expect(link.origin).toBe(app.url);

    // The lead sees the same message on the caught-mail page.
    await page.goto(`${app.url}/mail?id=${encodeURIComponent(mail.id)}`);
    await page.getByRole("heading", { level: 2, name: mail.subject }).waitFor();
    expect(await page.getByTestId("mail-body").textContent()).toContain(link.pathname);
    await screenshot(page, "caught-invitation");

    // The invitee, in a browser without the lead's session.
    await context.clearCookies();
    await page.goto(link.toString());
    await page.getByRole("heading", { level: 1, name: "Accept invitation" }).waitFor();
    expect(await page.getByText(DEMO_GROUP_NAME).count()).toBeGreaterThan(0);
    await page.getByLabel("Your name").fill("Invited Viewer (test)");
    await page.getByLabel("Choose a password").fill("invited-password-1");
    await page.getByRole("button", { name: "Create account and join" }).click();
    await page.waitForURL(/\/sites$/);
    await page.getByRole("heading", { level: 1, name: "Sites" }).waitFor();
    await screenshot(page, "invitee-joined");

    // The link is spent.
    await context.clearCookies();
    await page.goto(link.toString());
    await page.getByText("This invitation was used already").waitFor();

    // And the new account signs in with its password.
    await page.goto(`${app.url}/sign-in`);
    await page.getByLabel("E-mail address").fill(invitee);
    await page.getByLabel("Password").fill("invited-password-1");
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(/\/sites$/);
    await page.getByRole("link", { name: /Team/ }).first().click();
    await page.getByRole("heading", { level: 1, name: "Team" }).waitFor();
    expect(await page.getByRole("cell", { name: invitee }).count()).toBe(1);
    expect(await page.getByRole("button", { name: "Send invitation" }).count()).toBe(0);
  });
});
