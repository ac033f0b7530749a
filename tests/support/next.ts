/*
 * A fake request scope for calling server actions, server functions and route handlers
 * directly in vitest. tests/setup.ts mocks next/headers, next/navigation and next/cache
 * with the functions below, so code under test sees the cookies and headers of the
 * FakeClient that runs it.
 */
import { AsyncLocalStorage } from "node:async_hooks";

export type CookieAttributes = {
  httpOnly?: boolean;
  secure?: boolean;
  sameSite?: "lax" | "strict" | "none" | boolean;
  path?: string;
  domain?: string;
  maxAge?: number;
  expires?: Date | number;
};
export type CookieRecord = { name: string; value: string } & CookieAttributes;

/** An in-memory cookie store with the same surface as Next's cookies() result. */
export class CookieJar {
  private readonly store = new Map<string, CookieRecord>();
  /** Every cookie written with set()/delete(), in order, with its attributes. */
  readonly written: CookieRecord[] = [];

  get(name: string | { name: string }): CookieRecord | undefined {
    return this.store.get(typeof name === "string" ? name : name.name);
  }
  getAll(name?: string): CookieRecord[] {
    const all = [...this.store.values()];
    return name === undefined ? all : all.filter((c) => c.name === name);
  }
  has(name: string): boolean {
    return this.store.has(name);
  }
  get size(): number {
    return this.store.size;
  }
  set(nameOrCookie: string | CookieRecord, value?: string, attributes: CookieAttributes = {}): this {
    const record: CookieRecord =
      typeof nameOrCookie === "string" ? { ...attributes, name: nameOrCookie, value: value ?? "" } : { ...nameOrCookie };
    this.written.push(record);
    const expired =
      record.maxAge !== undefined && record.maxAge <= 0
        ? true
        : record.expires !== undefined && new Date(record.expires).getTime() <= Date.now();
    if (expired || record.value === "") this.store.delete(record.name);
    else this.store.set(record.name, record);
    return this;
  }
  delete(name: string | { name: string }): this {
    const n = typeof name === "string" ? name : name.name;
    this.written.push({ name: n, value: "", maxAge: 0, path: "/" });
    this.store.delete(n);
    return this;
  }
  clear(): this {
    for (const n of [...this.store.keys()]) this.delete(n);
    return this;
  }
  /** The last write of cookie `name` (to check attributes such as httpOnly). */
  lastWritten(name: string): CookieRecord | undefined {
    return this.written.filter((c) => c.name === name).at(-1);
  }
  toString(): string {
    return [...this.store.values()].map((c) => `${c.name}=${encodeURIComponent(c.value)}`).join("; ");
  }
}

/** What running code in a fake request ended with. */
export type Outcome<T> =
  | { kind: "value"; value: T }
  | { kind: "redirect"; location: string }
  | { kind: "notFound" }
  | { kind: "forbidden" }
  | { kind: "unauthorized" };

type Scope = { cookies: CookieJar; headers: Headers };
const scope = new AsyncLocalStorage<Scope>();

/**
 * A person's browser, as far as server code can tell: a cookie jar that persists across
 * calls and request headers (x-forwarded-for carries `ip`).
 */
export class FakeClient {
  readonly cookies = new CookieJar();
  readonly headers: Headers;

  constructor(init: { ip?: string; headers?: Record<string, string>; cookies?: Record<string, string> } = {}) {
    this.headers = new Headers(init.headers);
    this.headers.set("x-forwarded-for", init.ip ?? "203.0.113.10"); // RFC 5737 documentation address
    for (const [name, value] of Object.entries(init.cookies ?? {})) this.cookies.set(name, value);
  }

  /** Runs `fn` inside this client's request scope; redirect()/notFound() become outcomes. */
  async run<T>(fn: () => T | Promise<T>): Promise<Outcome<T>> {
    try {
      return { kind: "value", value: await scope.run({ cookies: this.cookies, headers: this.headers }, fn) };
    } catch (err) {
      const outcome = navigationOutcome(err);
      if (outcome) return outcome;
      throw err;
    }
  }

  /** Like run() but returns the value; a redirect or notFound fails with a clear error. */
  async call<T>(fn: () => T | Promise<T>): Promise<T> {
    const outcome = await this.run(fn);
    if (outcome.kind !== "value") throw new Error(`expected a value, got ${JSON.stringify(outcome)}`);
    return outcome.value;
  }
}

function current(what: string): Scope {
  const s = scope.getStore();
  if (!s) throw new Error(`\`${what}\` was called outside a request scope; wrap the call in FakeClient.run().`);
  return s;
}

// --- replacements for next/headers ---------------------------------------------------
export async function fakeCookies(): Promise<CookieJar> {
  return current("cookies").cookies;
}
export async function fakeHeaders(): Promise<Headers> {
  const s = current("headers");
  const h = new Headers(s.headers);
  const cookie = s.cookies.toString();
  if (cookie) h.set("cookie", cookie);
  return h;
}
export async function fakeDraftMode() {
  return { isEnabled: false, enable() {}, disable() {} };
}

// --- replacements for next/navigation ------------------------------------------------
// The digests are Next's own, so isRedirectError()/unstable_rethrow() treat these the same.
export class NavigationError extends Error {
  readonly digest: string;
  constructor(digest: string) {
    super(digest);
    this.digest = digest;
  }
}
export function fakeRedirect(url: string, type: "replace" | "push" = "replace"): never {
  throw new NavigationError(`NEXT_REDIRECT;${type};${url};307;`);
}
export function fakePermanentRedirect(url: string, type: "replace" | "push" = "replace"): never {
  throw new NavigationError(`NEXT_REDIRECT;${type};${url};308;`);
}
export function fakeNotFound(): never {
  throw new NavigationError("NEXT_HTTP_ERROR_FALLBACK;404");
}
export function fakeForbidden(): never {
  throw new NavigationError("NEXT_HTTP_ERROR_FALLBACK;403");
}
export function fakeUnauthorized(): never {
  throw new NavigationError("NEXT_HTTP_ERROR_FALLBACK;401");
}

function navigationOutcome(err: unknown): Exclude<Outcome<never>, { kind: "value" }> | null {
  const digest = typeof err === "object" && err !== null && "digest" in err ? String(err.digest) : "";
  if (digest.startsWith("NEXT_REDIRECT;")) return { kind: "redirect", location: digest.split(";")[2] ?? "" };
  if (digest === "NEXT_HTTP_ERROR_FALLBACK;404") return { kind: "notFound" };
  if (digest === "NEXT_HTTP_ERROR_FALLBACK;403") return { kind: "forbidden" };
  if (digest === "NEXT_HTTP_ERROR_FALLBACK;401") return { kind: "unauthorized" };
  return null;
}

// --- replacements for next/cache -----------------------------------------------------
/** Paths and tags revalidated since the last reset (assert on them if it matters). */
export const revalidated: { paths: string[]; tags: string[] } = { paths: [], tags: [] };
export function fakeRevalidatePath(path: string): void {
  revalidated.paths.push(path);
}
export function fakeRevalidateTag(tag: string): void {
  revalidated.tags.push(tag);
}

/** Builds FormData from a plain record (for calling actions). */
export function formData(values: Record<string, string | number | boolean | null | undefined>): FormData {
  const fd = new FormData();
  for (const [k, v] of Object.entries(values)) if (v !== undefined && v !== null) fd.set(k, String(v));
  return fd;
}
