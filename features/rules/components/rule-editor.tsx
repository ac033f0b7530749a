"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { LABEL_META, LABEL_ORDER, LabelBadge } from "@/lib/ui/label-badge";
import type { PreviewResult, RuleSetSummary } from "@/features/rules/schemas";

type Definition = {
  windows: Record<"afternoon" | "transition" | "evening", { startMinutes: number; endMinutes: number }>;
  minCoverage: Record<"afternoon" | "transition" | "evening", number>;
  calmSpeedMs: number;
  thresholds: Record<string, { kind: string; metric: string; op: string; value?: number; fallback?: number; percentile?: number; description?: string }>;
  [k: string]: unknown;
};

type Problem = { message: string; fieldErrors?: Record<string, string[]> };

async function send<T>(url: string, body: unknown): Promise<{ ok: true; data: T } | { ok: false; problem: Problem }> {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
  const data = (await res.json().catch(() => ({}))) as T & { error?: Problem };
  if (!res.ok) return { ok: false, problem: data.error ?? { message: `Request failed (${res.status}).` } };
  return { ok: true, data };
}

/**
 * Edit the thresholds and windows of a version, preview what the labels of a site and period would
 * become (nothing is saved), and, for a lead, save the edit as a new version with a comment.
 */
export function RuleEditor({
  groupId,
  versions,
  sites,
  canSave,
  defaultPeriod,
}: {
  groupId: number;
  versions: RuleSetSummary[];
  sites: Array<{ id: number; name: string }>;
  canSave: boolean;
  defaultPeriod: { from: string; to: string };
}) {
  const router = useRouter();
  const [baseId, setBaseId] = useState(versions[0]?.id ?? 0);
  const base = versions.find((v) => v.id === baseId) ?? versions[0];
  const [draft, setDraft] = useState<Definition | null>(() => (base ? (structuredClone(base.definition) as Definition) : null));
  const [siteId, setSiteId] = useState(sites[0]?.id ?? 0);
  const [from, setFrom] = useState(defaultPeriod.from);
  const [to, setTo] = useState(defaultPeriod.to);
  const [name, setName] = useState(base?.name ?? "");
  const [comment, setComment] = useState("");
  const [preview, setPreview] = useState<PreviewResult | null>(null);
  const [problem, setProblem] = useState<Problem | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const thresholds = useMemo(() => Object.entries(draft?.thresholds ?? {}), [draft]);
  if (!base || !draft) return <p className="text-sm text-ink-muted">No rule set yet: one is added when the first data are classified.</p>;

  const choose = (id: number) => {
    const v = versions.find((x) => x.id === id);
    setBaseId(id);
    if (v) {
      setDraft(structuredClone(v.definition) as Definition);
      setName(v.name);
    }
    setPreview(null);
  };
  const setNumber = (path: (d: Definition, v: number) => void) => (e: React.ChangeEvent<HTMLInputElement>) => {
    const v = Number(e.target.value);
    setDraft((d) => {
      if (!d) return d;
      const next = structuredClone(d);
      path(next, v);
      return next;
    });
  };

  const runPreview = async () => {
    setBusy(true);
    setProblem(null);
    const r = await send<PreviewResult>("/api/rule-sets/preview", { siteId, from, to, definition: draft });
    setBusy(false);
    if (r.ok) setPreview(r.data);
    else setProblem(r.problem);
  };
  const save = async () => {
    setBusy(true);
    setProblem(null);
    const r = await send<{ ruleSet: { version: number } }>("/api/rule-sets", { groupId, basedOnId: base.id, name, comment, definition: draft });
    setBusy(false);
    if (r.ok) {
      setSaved(`Saved as version ${r.data.ruleSet.version}. Activate it for a site below to re-label its evenings.`);
      setComment("");
      router.refresh();
    } else setProblem(r.problem);
  };

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-3">
        <label className="space-y-1 text-sm">
          <span className="block font-medium">Start from version</span>
          <select value={baseId} onChange={(e) => choose(Number(e.target.value))} className="field-input">
            {versions.map((v) => (
              <option key={v.id} value={v.id}>
                v{v.version} · {v.name}
              </option>
            ))}
          </select>
        </label>
      </div>
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium">Thresholds</legend>
        <div className="grid gap-2 sm:grid-cols-2">
          {thresholds.map(([key, t]) => (
            <label key={key} className="flex items-center gap-2 rounded-lg border border-line px-3 py-2 text-sm">
              <span className="min-w-0 flex-1">
                <span className="block font-mono text-xs">{key}</span>
                <span className="block truncate text-xs text-ink-muted" title={t.description}>
                  {t.metric} {t.op === "below" ? "<" : ">"}
                </span>
              </span>
              <input
                type="number"
                step="any"
                aria-label={`${key} value`}
                value={(t.kind === "absolute" ? t.value : t.fallback) ?? 0}
                onChange={setNumber((d, v) => {
                  const th = d.thresholds[key];
                  if (!th) return;
                  if (th.kind === "absolute") th.value = v;
                  else th.fallback = v;
                })}
                className="field-input w-24 text-right"
              />
            </label>
          ))}
        </div>
      </fieldset>
      <fieldset className="grid gap-2 sm:grid-cols-3">
        <legend className="mb-1 text-sm font-medium">Windows, minutes from sunset</legend>
        {(["afternoon", "transition", "evening"] as const).map((w) => (
          <div key={w} className="rounded-lg border border-line px-3 py-2 text-sm">
            <span className="block text-xs text-ink-muted capitalize">{w}</span>
            <div className="mt-1 flex items-center gap-1">
              <input type="number" aria-label={`${w} start`} value={draft.windows[w].startMinutes} onChange={setNumber((d, v) => (d.windows[w].startMinutes = v))} className="field-input w-20" />
              <span aria-hidden="true">to</span>
              <input type="number" aria-label={`${w} end`} value={draft.windows[w].endMinutes} onChange={setNumber((d, v) => (d.windows[w].endMinutes = v))} className="field-input w-20" />
            </div>
          </div>
        ))}
      </fieldset>

      <div className="rounded-xl bg-surface-sunken p-4">
        <p className="mb-3 text-sm font-medium">What if? Preview a site and period (nothing is saved)</p>
        <div className="flex flex-wrap items-end gap-3">
          <label className="space-y-1 text-sm">
            <span className="block text-xs text-ink-muted">Site</span>
            <select value={siteId} onChange={(e) => setSiteId(Number(e.target.value))} className="field-input">
              {sites.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                </option>
              ))}
            </select>
          </label>
          <label className="space-y-1 text-sm">
            <span className="block text-xs text-ink-muted">From</span>
            <input type="date" value={from} onChange={(e) => setFrom(e.target.value)} className="field-input" />
          </label>
          <label className="space-y-1 text-sm">
            <span className="block text-xs text-ink-muted">To</span>
            <input type="date" value={to} onChange={(e) => setTo(e.target.value)} className="field-input" />
          </label>
          <button type="button" className="btn-quiet" disabled={busy || !siteId} onClick={() => void runPreview()}>
            {busy ? "Working…" : "Preview"}
          </button>
        </div>
        {preview ? <PreviewView preview={preview} /> : null}
      </div>

      {problem ? (
        <div role="alert" className="rounded-lg border border-red-300 bg-red-50 px-3 py-2 text-sm text-red-800 dark:border-red-800 dark:bg-red-950/50 dark:text-red-200">
          {problem.message}
          {problem.fieldErrors ? (
            <ul className="mt-1 list-disc pl-5 text-xs">
              {Object.entries(problem.fieldErrors).map(([k, v]) => (
                <li key={k}>
                  {k}: {v.join(" ")}
                </li>
              ))}
            </ul>
          ) : null}
        </div>
      ) : null}

      {canSave ? (
        <div className="grid gap-3 sm:grid-cols-[1fr_2fr_auto] sm:items-end">
          <label className="space-y-1 text-sm">
            <span className="block font-medium">Name</span>
            <input value={name} onChange={(e) => setName(e.target.value)} className="field-input" />
          </label>
          <label className="space-y-1 text-sm">
            <span className="block font-medium">What changed and why</span>
            <input value={comment} onChange={(e) => setComment(e.target.value)} placeholder="e.g. evening u* stays higher in the hollow" className="field-input" />
          </label>
          <button type="button" className="btn-primary" disabled={busy} onClick={() => void save()}>
            Save as new version
          </button>
          {saved ? (
            <p role="status" className="text-sm text-ink sm:col-span-3">
              {saved}
            </p>
          ) : null}
        </div>
      ) : (
        <p className="text-xs text-ink-muted">Only a lead saves new versions; anyone from analyst up can preview.</p>
      )}
    </div>
  );
}

function PreviewView({ preview }: { preview: PreviewResult }) {
  return (
    <div className="mt-4 space-y-3">
      <table className="text-sm tabular-nums">
        <thead>
          <tr className="text-left text-xs text-ink-muted">
            <th className="pr-4 font-medium">Automatic label</th>
            <th className="pr-4 text-right font-medium">Now</th>
            <th className="text-right font-medium">With this edit</th>
          </tr>
        </thead>
        <tbody>
          {LABEL_ORDER.map((l) => (
            <tr key={l}>
              <td className="py-0.5 pr-4">
                <LabelBadge label={l} />
              </td>
              <td className="pr-4 text-right">{preview.before[l]}</td>
              <td className="text-right font-semibold">{preview.after[l]}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-sm">
        {preview.changes.length} of {preview.evenings} evenings would change
        {preview.changesUnderOverride ? `; ${preview.changesUnderOverride} of them keep an analyst's override on top` : ""}.
      </p>
      {preview.changes.length ? (
        <ul className="max-h-64 space-y-1 overflow-y-auto text-sm">
          {preview.changes.map((c) => (
            <li key={c.date} className="flex flex-wrap items-center gap-2">
              {c.eveningId ? (
                <Link href={`/sites/${preview.siteId}/evenings/${c.eveningId}`} className="font-mono text-xs underline-offset-2 hover:underline">
                  {c.date}
                </Link>
              ) : (
                <span className="font-mono text-xs">{c.date}</span>
              )}
              {c.before ? <LabelBadge label={c.before} compact /> : <span className="text-xs text-ink-muted">new</span>}
              <span aria-hidden="true">→</span>
              <LabelBadge label={c.after} compact />
              <span className="sr-only">
                from {c.before ? LABEL_META[c.before].name : "none"} to {LABEL_META[c.after].name}
              </span>
              {c.override ? <span className="text-xs text-ink-muted">(override {LABEL_META[c.override].name} stays)</span> : null}
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
