// A small line chart of the key temperatures during a visit, as an SVG string: the report's PDF
// and e-mail carry it as a picture (rendered to PNG on the server), so it needs no script. Pure.

export interface TrendLine {
  label: string;
  time: readonly number[];
  value: readonly number[];
}

export interface TrendChartOptions {
  fromMs: number;
  toMs: number;
  unit: string;
  timeZone: string;
  widthPx?: number;
  heightPx?: number;
  /** Marks drawn as vertical lines (visit opened, closed). */
  marks?: Array<{ atMs: number; label: string }>;
}

const escapeXml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&apos;" })[c]!);

/** Dash patterns as well as greys, so the lines are told apart in print and without colour. */
const styles = [
  { stroke: "#1f2328", dash: "" },
  { stroke: "#5b636b", dash: "6 4" },
  { stroke: "#1f2328", dash: "2 3" },
  { stroke: "#5b636b", dash: "10 3 2 3" },
];

/** Round numbers for the value axis: about 4–7 ticks on a 1/2/5 step. */
export function niceTicks(min: number, max: number): number[] {
  if (!(max > min)) return [min];
  const raw = (max - min) / 6;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw)!;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + 1e-9; v += step) ticks.push(Math.round(v * 1e6) / 1e6);
  return ticks;
}

export function reportTrendSvg(lines: readonly TrendLine[], o: TrendChartOptions): string | null {
  const all = lines.flatMap((l) => l.value.filter((v) => Number.isFinite(v)));
  if (all.length === 0 || o.toMs <= o.fromMs) return null;
  const W = o.widthPx ?? 640;
  const H = o.heightPx ?? 240;
  const left = 48;
  const right = 12;
  const top = 12;
  const legendH = 18 * Math.ceil(lines.length / 2);
  const bottom = 28 + legendH;
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  // A flat line gets a band around it, so it draws in the middle rather than on an edge.
  if (hi - lo < 2) {
    lo -= 1;
    hi += 1;
  }
  const ticks = niceTicks(lo, hi);
  lo = Math.min(lo, ticks[0]);
  hi = Math.max(hi, ticks[ticks.length - 1]);
  const x = (t: number) => left + ((t - o.fromMs) / (o.toMs - o.fromMs)) * (W - left - right);
  const y = (v: number) => top + (1 - (v - lo) / (hi - lo)) * (H - top - bottom);
  const fmtTime = new Intl.DateTimeFormat("en-US", { timeZone: o.timeZone, timeStyle: "short" });
  const out: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" font-family="Helvetica, Arial, sans-serif" font-size="11">`,
    `<rect width="${W}" height="${H}" fill="#ffffff"/>`,
  ];
  for (const t of ticks) {
    out.push(`<line x1="${left}" x2="${W - right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}" stroke="#d8dcdf"/>`);
    out.push(
      `<text x="${left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end" fill="#1f2328">${escapeXml(String(t))}</text>`,
    );
  }
  out.push(`<text x="4" y="${top + 4}" fill="#1f2328">${escapeXml(o.unit)}</text>`);
  for (const t of [o.fromMs, (o.fromMs + o.toMs) / 2, o.toMs]) {
    out.push(
      `<text x="${x(t).toFixed(1)}" y="${H - bottom + 16}" text-anchor="middle" fill="#1f2328">${escapeXml(fmtTime.format(t))}</text>`,
    );
  }
  for (const m of o.marks ?? []) {
    if (m.atMs < o.fromMs || m.atMs > o.toMs) continue;
    out.push(
      `<line x1="${x(m.atMs).toFixed(1)}" x2="${x(m.atMs).toFixed(1)}" y1="${top}" y2="${H - bottom}" stroke="#5b636b" stroke-dasharray="1 3"/>`,
      `<text x="${(x(m.atMs) + 3).toFixed(1)}" y="${top + 10}" fill="#5b636b">${escapeXml(m.label)}</text>`,
    );
  }
  lines.forEach((l, i) => {
    const s = styles[i % styles.length];
    const pts = l.time
      .map((t, k) => [t, l.value[k]] as const)
      .filter(([t, v]) => Number.isFinite(v) && t >= o.fromMs && t <= o.toMs)
      .map(([t, v]) => `${x(t).toFixed(1)},${y(v).toFixed(1)}`);
    if (pts.length)
      out.push(
        `<polyline fill="none" stroke="${s.stroke}" stroke-width="2"${s.dash ? ` stroke-dasharray="${s.dash}"` : ""} points="${pts.join(" ")}"/>`,
      );
    const lx = left + (i % 2) * ((W - left) / 2);
    const ly = H - legendH + 12 + Math.floor(i / 2) * 18;
    out.push(
      `<line x1="${lx}" x2="${lx + 24}" y1="${ly - 4}" y2="${ly - 4}" stroke="${s.stroke}" stroke-width="2"${s.dash ? ` stroke-dasharray="${s.dash}"` : ""}/>`,
      `<text x="${lx + 30}" y="${ly}" fill="#1f2328">${escapeXml(l.label)}</text>`,
    );
  });
  out.push("</svg>");
  return out.join("");
}
