import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { getActiveGroup, requireSession } from "@/lib/auth/session";
import { roleAtLeast } from "@/lib/auth/roles";
import { LabelCaution } from "@/lib/ui/caution";
import { LABEL_META } from "@/lib/ui/label-badge";
import { PageHeader } from "@/lib/ui/page-header";
import { listRuleSets, sitesWithRules } from "@/features/rules/server/queries";
import { RuleEditor } from "@/features/rules/components/rule-editor";
import { ActivateVersion } from "@/features/rules/components/activate-version";
import { agreementQuerySchema } from "@/features/agreement/schemas";
import { agreementReport, cellEvenings } from "@/features/agreement/server/queries";
import { AgreementTable } from "@/features/agreement/components/agreement-table";
import { eveningExtent } from "@/features/seasons/server/queries";

export const metadata: Metadata = { title: "Rules" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };
const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

export default async function RulesPage({ searchParams }: Props) {
  const { user } = await requireSession().catch(() => redirect("/sign-in"));
  const active = await getActiveGroup();
  if (!active) return <PageHeader title="Rules" description="You are not a member of any research group yet." />;
  const sp = await searchParams;
  const [versions, sites] = await Promise.all([listRuleSets(user, active.groupId), sitesWithRules(active.groupId)]);
  const isLead = roleAtLeast(active.role, "lead");
  const canPreview = roleAtLeast(active.role, "analyst");

  const siteParam = first(sp.site) ?? (sites[0] ? String(sites[0].id) : undefined);
  const aq = agreementQuerySchema.safeParse({ site: siteParam, from: first(sp.from), to: first(sp.to), auto: first(sp.auto), final: first(sp.final) });
  const agreementSiteOk = aq.success && sites.some((s) => s.id === aq.data.site);
  const agreement = agreementSiteOk && aq.success ? await agreementReport(user, aq.data.site, aq.data) : null;
  const cell =
    agreementSiteOk && aq.success && aq.data.auto && aq.data.final
      ? { auto: aq.data.auto, final: aq.data.final, evenings: await cellEvenings(user, aq.data.site, aq.data.auto, aq.data.final, aq.data) }
      : null;
  const extent = sites[0] ? await eveningExtent([sites[0].id]) : { from: null, to: null };
  const lastMonthFrom = extent.to ? new Date(Date.parse(`${extent.to}T00:00:00Z`) - 89 * 86_400_000).toISOString().slice(0, 10) : "";
  const defaultPeriod = {
    from: extent.from && lastMonthFrom < extent.from ? extent.from : lastMonthFrom,
    to: extent.to ?? "",
  };
  const cellHref = (a: string, f: string) => {
    const q = new URLSearchParams({ site: String(agreement?.siteId ?? ""), auto: a, final: f });
    if (agreement?.from) q.set("from", agreement.from);
    if (agreement?.to) q.set("to", agreement.to);
    return `/rules?${q.toString()}#agreement`;
  };

  return (
    <>
      <PageHeader
        eyebrow={active.groupName}
        title="Rules"
        description="The classifier's thresholds and windows, versioned. A version that has labelled evenings never changes: an edit becomes a new version with its author and reason."
      />
      <div className="space-y-6">
        <LabelCaution />
        <section aria-labelledby="versions-title" className="card p-5">
          <h2 id="versions-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
            Versions
          </h2>
          {versions.length === 0 ? (
            <p className="text-sm text-ink-muted italic">No versions yet: the default rules are stored as version 1 when data are first classified.</p>
          ) : (
            <div className="overflow-x-auto">
              <table className="w-full min-w-[40rem] text-sm">
                <thead>
                  <tr className="border-b border-line text-left text-xs text-ink-muted">
                    <th className="py-2 pr-3 font-medium">Version</th>
                    <th className="py-2 pr-3 font-medium">Name and reason</th>
                    <th className="py-2 pr-3 font-medium">Author</th>
                    <th className="py-2 pr-3 font-medium">Created</th>
                    <th className="py-2 pr-3 text-right font-medium">Evenings labelled</th>
                    <th className="py-2 font-medium">Active at</th>
                  </tr>
                </thead>
                <tbody>
                  {versions.map((v) => (
                    <tr key={v.id} className="border-b border-line/60 align-top">
                      <td className="py-2 pr-3 font-mono">v{v.version}</td>
                      <td className="py-2 pr-3">
                        <span className="block">{v.name}</span>
                        {v.comment ? <span className="block text-xs text-ink-muted">{v.comment}</span> : null}
                      </td>
                      <td className="py-2 pr-3">{v.author ?? "—"}</td>
                      <td className="py-2 pr-3 font-mono text-xs">{v.createdAt.slice(0, 10)}</td>
                      <td className="py-2 pr-3 text-right tabular-nums">
                        {v.eveningsLabelled}
                        {v.eveningsLabelled > 0 ? <span className="ml-1 text-xs text-ink-muted" title="in use: fixed">🔒</span> : null}
                      </td>
                      <td className="py-2 text-xs">{v.activeOn.map((s) => s.name).join(", ") || "—"}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </section>

        {canPreview && versions.length > 0 ? (
          <section aria-labelledby="edit-title" className="card p-5">
            <h2 id="edit-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Edit and preview
            </h2>
            <RuleEditor groupId={active.groupId} versions={versions} sites={sites} canSave={isLead} defaultPeriod={defaultPeriod} />
          </section>
        ) : null}

        {sites.length > 0 ? (
          <section aria-labelledby="sites-title" className="card p-5">
            <h2 id="sites-title" className="mb-3 text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Rules in use per site
            </h2>
            <ul className="divide-y divide-line">
              {sites.map((s) => (
                <li key={s.id} className="flex flex-wrap items-center justify-between gap-3 py-2">
                  <span className="text-sm">
                    {s.name} <span className="font-mono text-xs text-ink-muted">{s.activeVersion ? `v${s.activeVersion}` : "no version yet"}</span>
                  </span>
                  {isLead && versions.length > 0 ? <ActivateVersion site={s} versions={versions.map((v) => ({ id: v.id, version: v.version }))} /> : null}
                </li>
              ))}
            </ul>
            {isLead ? (
              <p className="mt-2 text-xs text-ink-muted">Activating re-labels every evening of the site in the background; analysts&apos; overrides stay on top.</p>
            ) : null}
          </section>
        ) : null}

        <section id="agreement" aria-labelledby="agreement-title" className="card space-y-4 p-5">
          <div className="flex flex-wrap items-end justify-between gap-3">
            <h2 id="agreement-title" className="text-sm font-semibold tracking-wide text-ink-muted uppercase">
              Do the analysts agree with the rules?
            </h2>
            <form method="get" action="/rules#agreement" className="flex flex-wrap items-end gap-2 text-sm">
              <label className="space-y-1">
                <span className="block text-xs text-ink-muted">Site</span>
                <select name="site" defaultValue={siteParam} className="field-input py-1">
                  {sites.map((s) => (
                    <option key={s.id} value={s.id}>
                      {s.name}
                    </option>
                  ))}
                </select>
              </label>
              <label className="space-y-1">
                <span className="block text-xs text-ink-muted">From</span>
                <input type="date" name="from" defaultValue={first(sp.from) ?? ""} className="field-input py-1" />
              </label>
              <label className="space-y-1">
                <span className="block text-xs text-ink-muted">To</span>
                <input type="date" name="to" defaultValue={first(sp.to) ?? ""} className="field-input py-1" />
              </label>
              <button type="submit" className="btn-quiet py-1">
                Show
              </button>
            </form>
          </div>
          {agreement ? (
            <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
              <AgreementTable report={agreement} cellHref={cellHref} selected={cell ?? undefined} />
              <div>
                {cell ? (
                  <>
                    <h3 className="mb-2 text-sm font-medium">
                      Automatic {LABEL_META[cell.auto].name}, final {LABEL_META[cell.final].name}: {cell.evenings.length} evenings
                    </h3>
                    <ul className="max-h-80 space-y-1 overflow-y-auto text-sm">
                      {cell.evenings.map((e) => (
                        <li key={e.id}>
                          <Link href={`/sites/${agreement.siteId}/evenings/${e.id}`} className="font-mono text-xs underline-offset-2 hover:underline">
                            {e.date}
                          </Link>
                          {e.note ? <span className="ml-2 text-xs text-ink-muted">{e.note}</span> : null}
                        </li>
                      ))}
                    </ul>
                  </>
                ) : (
                  <p className="text-sm text-ink-muted">Choose a count to list its evenings.</p>
                )}
              </div>
            </div>
          ) : (
            <p className="text-sm text-ink-muted">No site to compare yet.</p>
          )}
        </section>
      </div>
    </>
  );
}
