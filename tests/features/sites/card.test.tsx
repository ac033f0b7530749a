import { describe, expect, test } from "vitest";
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { renderToStaticMarkup } from "react-dom/server";
import { LABEL_CAUTION } from "@/lib/ui/caution";
import type { SiteSummary } from "@/features/sites/schemas";
import { SiteCard } from "@/features/sites/components/site-card";
import { SiteList } from "@/features/sites/components/site-list";
import { sitesKeys } from "@/features/sites/queries";

// An invented site (synthetic); only the summary's way onto the card is checked.
const site: SiteSummary = {
  id: 3,
  groupId: 1,
  name: "Synthetic ridge tower",
  latitude: 46.5,
  longitude: 8.25,
  elevationM: 900,
  measurementHeightM: 30,
  canopyHeightM: 20,
  displacementHeightM: null,
  utcOffsetHours: 1,
  notes: null,
  createdAt: "2024-01-01T00:00:00.000Z",
  updatedAt: "2024-01-01T00:00:00.000Z",
  coverage: {
    firstUtc: "2023-01-01T00:00:00.000Z",
    lastUtc: "2024-12-31T22:30:00.000Z",
    presentHalfHours: 34_900,
    spanHalfHours: 35_086,
    share: 34_900 / 35_086,
    evenings: 731,
  },
  labelCounts: { local: 360, stagnant: 180, advective: 170, unclassified: 21 },
};

const text = (html: string) => html.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");

describe("site card", () => {
  test("coverage on the site's data clock, share rounded down, evenings", () => {
    const t = text(renderToStaticMarkup(<SiteCard site={site} />));
    // period starts 00:00 and 22:30 UTC read 01:00 and 23:30 on a UTC+1 clock
    expect(t).toContain("2023-01-01 01:00 – 2024-12-31 23:30 UTC+01:00");
    // 34 900 / 35 086 = 0.99469..., shown rounded down
    expect(t).toContain("99.4 % of half-hours present (34,900 of 35,086)");
    expect(t).toContain("731 evenings");
  });

  test("label counts with glyph and name for every label, never colour alone", () => {
    const html = renderToStaticMarkup(<SiteCard site={site} />);
    const t = text(html);
    for (const [glyph, name, n] of [
      ["L", "locally driven", 360],
      ["S", "stagnant", 180],
      ["A", "advective", 170],
      ["U", "unclassified", 21],
    ] as const) {
      expect(t).toContain(`${glyph} ${name} ${n}`);
    }
  });

  test("a site without data says so", () => {
    const t = text(renderToStaticMarkup(<SiteCard site={{ ...site, coverage: null, labelCounts: null }} />));
    expect(t).toContain("no data yet");
    expect(t).toContain("no evenings yet");
  });

  test("the list carries the caution once the counts appear, and not before", () => {
    const list = (sites: SiteSummary[]) => {
      const client = new QueryClient();
      client.setQueryData(sitesKeys.list(site.groupId), sites);
      return renderToStaticMarkup(
        <QueryClientProvider client={client}>
          <SiteList groupId={site.groupId} canManage={false} />
        </QueryClientProvider>,
      );
    };
    expect(list([site])).toContain(LABEL_CAUTION);
    expect(list([{ ...site, coverage: null, labelCounts: null }])).not.toContain(LABEL_CAUTION);
  });
});
