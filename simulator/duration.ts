// Parsing durations like "3h", "90m", "45s", "1h30m" or plain seconds.
export function parseDurationS(text: string): number {
  const t = text.trim();
  if (/^\d+(\.\d+)?$/.test(t)) return Number(t);
  const re = /(\d+(?:\.\d+)?)\s*(d|h|m|s)/g;
  let total = 0;
  let matched = "";
  for (const m of t.matchAll(re)) {
    total += Number(m[1]) * { d: 86400, h: 3600, m: 60, s: 1 }[m[2] as "d" | "h" | "m" | "s"];
    matched += m[0];
  }
  if (matched.replace(/\s/g, "") !== t.replace(/\s/g, "") || matched === "")
    throw new Error(`cannot read duration "${text}" (use e.g. 3h, 90m, 1h30m, 600s)`);
  return total;
}
