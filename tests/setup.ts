/*
 * Runs in every test worker before each test file: points the app at this run's fresh
 * database and swaps Next's request-bound APIs for the fake scope in tests/support/next.ts.
 */
import { inject, vi } from "vitest";

process.env.DATABASE_URL = inject("databaseUrl");
// Mail goes to this run's local catcher (started in tests/global-setup.ts), never to a real server.
delete process.env.SMTP_HOST;
delete process.env.SMTP_PORT;
process.env.MAIL_CATCHER_PORT = String(inject("mailCatcherPort"));
process.env.MAIL_DIR = inject("mailDir");

vi.mock("next/headers", async () => {
  const fake = await import("./support/next");
  return { cookies: fake.fakeCookies, headers: fake.fakeHeaders, draftMode: fake.fakeDraftMode };
});

vi.mock("next/navigation", async (importOriginal) => {
  const fake = await import("./support/next");
  return {
    ...(await importOriginal<Record<string, unknown>>()),
    redirect: fake.fakeRedirect,
    permanentRedirect: fake.fakePermanentRedirect,
    notFound: fake.fakeNotFound,
    forbidden: fake.fakeForbidden,
    unauthorized: fake.fakeUnauthorized,
  };
});

vi.mock("next/cache", async (importOriginal) => {
  const fake = await import("./support/next");
  return {
    ...(await importOriginal<Record<string, unknown>>()),
    revalidatePath: fake.fakeRevalidatePath,
    revalidateTag: fake.fakeRevalidateTag,
    updateTag: fake.fakeRevalidateTag,
    refresh: () => {},
  };
});
