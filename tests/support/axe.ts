/*
 * axe-core in a test's chromium page: the accessibility check of the browser tests.
 */
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const axeSource = (createRequire(import.meta.url)("axe-core") as { source: string }).source;

export type AxeViolation = { id: string; impact: string | null; help: string; nodes: Array<{ target: string[] }> };

/** axe-core over the whole document (the shell as well as the page); its serious and critical violations. */
export async function seriousViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(axeSource);
  const result = await page.evaluate(async () => {
    const w = window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: AxeViolation[] }> } };
    return w.axe.run(document, { resultTypes: ["violations"] });
  });
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => ({ ...v, nodes: v.nodes.slice(0, 5) }));
}
