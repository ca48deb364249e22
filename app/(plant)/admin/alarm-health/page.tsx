import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { isAdmin } from "@/lib/auth/viewer";
import { formatDateTime } from "@/lib/client/format";
import { formatDuration } from "@/lib/units";
import { alarmHealthReport } from "@/lib/server/alarm-health";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Alarm-system health" };
export const dynamic = "force-dynamic";

const assessmentText = {
  acceptable: "acceptable (< 1 per 10 min)",
  manageable: "manageable (1–2 per 10 min)",
  overloaded: "overloaded (> 2 per 10 min)",
} as const;

function report() {
  return alarmHealthReport(getDb(), Date.now());
}

export default async function AlarmHealthPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const h = report();
  const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
  const card = "rounded-lg border border-line bg-panel p-4";
  return (
    <section className="flex flex-col gap-4">
      <div>
        <h1 className="text-2xl font-semibold">Alarm-system health</h1>
        <p className="mt-1 max-w-prose text-muted">
          Last 7 days, all sites, measured against ISA-18.2 and EEMUA 191 guidance: under one alarm per 10 minutes per
          on-call person, no floods (more than 10 in 10 minutes), no chattering, few stale alarms, and a priority split
          near 80 / 15 / 5 % with under 1 % critical.
        </p>
      </div>
      <div className="grid gap-3 sm:grid-cols-3">
        <div className={card}>
          <p className="text-sm text-muted">Alarms raised</p>
          <p className="text-2xl font-semibold" data-testid="health-activations">
            {h.activations}
          </p>
        </div>
        <div className={card}>
          <p className="text-sm text-muted">Average per 10 min per on-call person</p>
          <p className="text-2xl font-semibold">{h.rate.averagePer10MinPerPerson.toFixed(2)}</p>
          <p className={`text-sm ${h.rate.assessment === "acceptable" ? "text-muted" : "text-alarm"}`}>
            {assessmentText[h.rate.assessment]}
          </p>
        </div>
        <div className={card}>
          <p className="text-sm text-muted">Peak 10 min · time in flood</p>
          <p className="text-2xl font-semibold">
            {h.rate.peakPer10MinPerPerson} · {pct(h.timeInFloodFraction)}
          </p>
          <p className="text-sm text-muted">{h.floods.length} flood(s)</p>
        </div>
      </div>
      <div className={card}>
        <h2 className="font-semibold">Priority distribution</h2>
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-muted">
            <tr>
              <th className="py-1 font-normal">Priority</th>
              <th className="py-1 font-normal">Count</th>
              <th className="py-1 font-normal">Share</th>
              <th className="py-1 font-normal">Guidance</th>
            </tr>
          </thead>
          <tbody>
            {h.priorityDistribution.map((p) => (
              <tr key={p.priority} className="border-t border-line/60">
                <td className="py-1">{p.label}</td>
                <td className="py-1">{p.count}</td>
                <td className={`py-1 ${p.withinGuidance ? "" : "font-semibold text-warning"}`}>{pct(p.share)}</td>
                <td className="py-1 text-muted">{p.target}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="grid gap-3 md:grid-cols-3">
        <div className={card}>
          <h2 className="font-semibold">Most frequent ({pct(h.topShare)} of all)</h2>
          <ol className="mt-2 list-decimal pl-5 text-sm">
            {h.topAlarms.map((a) => (
              <li key={a.alarmKey}>
                {a.alarmKey.split("/")[0]} · {a.equipment} · {a.ruleId.replaceAll("_", " ")} — {a.count}
              </li>
            ))}
          </ol>
          {h.topAlarms.length === 0 ? <p className="text-sm text-muted">None.</p> : null}
        </div>
        <div className={card}>
          <h2 className="font-semibold">Chattering (≥ 3 changes in 60 s)</h2>
          <ul className="mt-2 text-sm">
            {h.chattering.map((c) => (
              <li key={c.alarmKey}>
                {c.alarmKey} — {c.maxTransitionsInWindow} changes from {formatDateTime(c.firstAtMs)}
              </li>
            ))}
          </ul>
          {h.chattering.length === 0 ? <p className="text-sm text-muted">None.</p> : null}
        </div>
        <div className={card}>
          <h2 className="font-semibold">Stale (active over 24 h)</h2>
          <ul className="mt-2 text-sm">
            {h.stale.map((s) => (
              <li key={s.alarmKey}>
                {s.alarmKey} — {formatDuration(s.activeForS)}
              </li>
            ))}
          </ul>
          {h.stale.length === 0 ? <p className="text-sm text-muted">None.</p> : null}
        </div>
      </div>
    </section>
  );
}
