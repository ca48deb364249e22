"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";
import type { PointListResultDto } from "@/lib/dto/points";
import { POINT_LIST_COLUMNS, type PlannedPoint } from "@/lib/point-list-csv";

type Outcome = { kind: "preview" | "applied"; result: PointListResultDto } | { kind: "failed"; message: string };

const actionLabel: Record<PlannedPoint["action"], string> = {
  create: "New",
  update: "Changed",
  unchanged: "Unchanged",
};

/** "—" for no limit; limits are shown in the canonical unit they are stored in. */
const show = (v: number | null | undefined) => (v === null || v === undefined ? "—" : String(Number(v.toPrecision(6))));

function valuesText(v: PlannedPoint["before"]) {
  if (!v) return "—";
  return `${v.expectedIntervalS} s, ${show(v.lowLimit)} … ${show(v.highLimit)} ${v.unit}`;
}

/**
 * A site's point-list import: paste or choose a CSV, see what it would create and change, then
 * apply it. Nothing is applied unless every row is good; errors are listed by line and column.
 */
export function PointListImport({ siteId }: { siteId: string }) {
  const [text, setText] = useState("");
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  const [busy, setBusy] = useState(false);
  const [showUnchanged, setShowUnchanged] = useState(false);

  async function send(apply: boolean) {
    setBusy(true);
    try {
      const res = await fetch(`/api/sites/${encodeURIComponent(siteId)}/point-list${apply ? "" : "?dryRun=1"}`, {
        method: "POST",
        headers: { "content-type": "text/csv" },
        body: text,
      });
      const body = await res.json().catch(() => null);
      if (body && "plan" in body) setOutcome({ kind: apply && body.applied ? "applied" : "preview", result: body });
      else setOutcome({ kind: "failed", message: body?.error?.message ?? `The upload failed (${res.status}).` });
    } catch (err) {
      setOutcome({ kind: "failed", message: (err as Error).message });
    } finally {
      setBusy(false);
    }
  }

  const result = outcome && outcome.kind !== "failed" ? outcome.result : null;
  const canApply = outcome?.kind === "preview" && result && result.errors.length === 0;
  const changes = result ? result.plan.counts.create + result.plan.counts.update : 0;
  const items = result ? result.plan.items.filter((i) => showUnchanged || i.action !== "unchanged") : [];

  return (
    <div className="space-y-4">
      <div className="rounded-lg border border-line bg-panel p-4">
        <p className="mb-2 text-sm">
          One row a point, header <code className="break-all">{POINT_LIST_COLUMNS.join(", ")}</code>. Limits are in the
          row&apos;s unit and kept in SI. Equipment must already exist at the site.
        </p>
        <div className="mb-2 flex flex-wrap gap-2">
          <label className="inline-flex min-h-11 cursor-pointer items-center rounded border border-line px-4 text-sm font-semibold hover:bg-surface">
            Choose CSV file
            <input
              type="file"
              accept=".csv,text/csv"
              className="sr-only"
              onChange={async (e) => {
                const f = e.target.files?.[0];
                e.target.value = "";
                if (f) {
                  setText(await f.text());
                  setOutcome(null);
                }
              }}
            />
          </label>
        </div>
        <label className="flex flex-col gap-1 text-sm font-semibold" htmlFor="point-list-text">
          Or paste it here
          <textarea
            id="point-list-text"
            className="min-h-40 w-full rounded border border-line bg-panel p-2 font-mono text-xs font-normal"
            value={text}
            spellCheck={false}
            onChange={(e) => {
              setText(e.target.value);
              setOutcome(null);
            }}
          />
        </label>
        <div className="mt-3 flex flex-wrap gap-2">
          <Button disabled={busy || text.trim() === ""} onClick={() => void send(false)}>
            Preview
          </Button>
          {canApply ? (
            <Button
              variant="secondary"
              disabled={busy || changes === 0}
              onClick={() => {
                if (
                  window.confirm(
                    `Apply the point list? ${result.plan.counts.create} new and ${result.plan.counts.update} changed point(s).`,
                  )
                )
                  void send(true);
              }}
            >
              Apply {changes} change(s)
            </Button>
          ) : null}
        </div>
      </div>

      {outcome?.kind === "failed" ? (
        <p className="text-alarm" role="alert">
          {outcome.message}
        </p>
      ) : null}

      {result && result.errors.length > 0 ? (
        <div role="alert">
          <p className="font-semibold text-alarm">Nothing was changed: {result.errors.length} problem(s) to fix.</p>
          <ul className="mt-1 max-h-80 overflow-y-auto font-mono text-xs">
            {result.errors.map((e, i) => (
              <li key={i}>
                line {e.line}
                {e.column ? `, ${e.column}` : ""}: {e.message}
              </li>
            ))}
          </ul>
        </div>
      ) : null}

      {result && result.errors.length === 0 ? (
        <div role="status">
          <p className="font-semibold">
            {outcome?.kind === "applied" ? "Applied: " : "Would apply: "}
            {result.plan.counts.create} new, {result.plan.counts.update} changed, {result.plan.counts.unchanged}{" "}
            unchanged.
          </p>
          <label className="my-2 flex items-center gap-2 text-sm">
            <input type="checkbox" checked={showUnchanged} onChange={(e) => setShowUnchanged(e.target.checked)} />
            Show unchanged points
          </label>
          <div tabIndex={0} role="region" aria-label="Point list preview" className="overflow-x-auto">
            {/* On a phone the line, equipment and before columns fold into their neighbours to fit 390 px. */}
            <table className="w-full text-left text-sm">
              <thead>
                <tr className="border-b border-line">
                  <th className="py-1 pr-2 max-sm:hidden">Line</th>
                  <th className="py-1 pr-2 max-sm:hidden">Equipment</th>
                  <th className="py-1 pr-2">Point</th>
                  <th className="py-1 pr-2">What</th>
                  <th className="py-1 pr-2 max-sm:hidden">Before</th>
                  <th className="py-1 pr-2">After</th>
                </tr>
              </thead>
              <tbody>
                {items.slice(0, 1000).map((i) => (
                  <tr key={i.line} className="border-b border-line/50">
                    <td className="py-1 pr-2 font-mono max-sm:hidden">{i.line}</td>
                    <td className="py-1 pr-2 max-sm:hidden">{i.equipmentTag}</td>
                    <td className="py-1 pr-2 font-mono text-xs break-all">
                      <span className="block font-sans text-sm sm:hidden">
                        {i.equipmentTag} · line {i.line}
                      </span>
                      {i.quantity}
                    </td>
                    <td className="py-1 pr-2">{actionLabel[i.action]}</td>
                    <td className="py-1 pr-2 max-sm:hidden">{valuesText(i.before)}</td>
                    <td className="py-1 pr-2">
                      {i.before ? <span className="block text-muted sm:hidden">{valuesText(i.before)} →</span> : null}
                      {valuesText(i.after)}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            {items.length > 1000 ? (
              <p className="text-sm text-muted">First 1,000 of {items.length} rows shown.</p>
            ) : null}
          </div>
        </div>
      ) : null}
    </div>
  );
}
