import { readFileSync } from "node:fs";
import path from "node:path";
import { interpolate, wcagContrast } from "culori";
import { describe, expect, it } from "vitest";

// Contrast of the theme tokens in app/globals.css, light and dark, computed by culori's
// `wcagContrast` (the WCAG 2.2 relative-luminance formula, "contrast ratio" definition).
//   SC 1.4.3 Contrast (Minimum), AA: 4.5:1 for text.
//   SC 1.4.6 Contrast (Enhanced), AAA: 7:1 — held here for live values and alarm text.
//   SC 1.4.11 Non-text Contrast, AA: 3:1 for the focus ring and form controls' borders against what they sit on.

const css = readFileSync(path.resolve(import.meta.dirname, "../../app/globals.css"), "utf8");

function tokensIn(block: string): Record<string, string> {
  return Object.fromEntries([...block.matchAll(/--color-([a-z-]+):\s*(#[0-9a-f]{6})/gi)].map((m) => [m[1], m[2]]));
}

function blockAfter(selector: string): string {
  const start = css.indexOf(selector);
  if (start < 0) throw new Error(`${selector} not found in globals.css`);
  return css.slice(start, css.indexOf("}", start));
}

const light = tokensIn(blockAfter("@theme {"));
const darkSwitch = tokensIn(blockAfter(':root[data-theme="dark"] {'));
const darkDevice = tokensIn(blockAfter(':root:not([data-theme="light"]) {'));
const dark = { ...light, ...darkSwitch };

/** Tailwind v4's `bg-x/NN` mixes the colour into transparency in oklab; over a panel that is this blend. */
const tint = (over: string, color: string, share: number) => interpolate([over, color], "oklab")(share);

type Pair = [text: string, background: string | ReturnType<typeof tint>, what: string];

function pairs(t: Record<string, string>) {
  const aaa: Pair[] = [
    [t.ink, t.panel, "live values (text-ink on bg-panel)"],
    [t.ink, t.surface, "text-ink on the page"],
    [t.alarm, t.panel, "alarm text on a panel"],
    [t.alarm, t.surface, "alarm text on the page"],
    [t.alarm, tint(t.panel, t.alarm, 0.05), "alarm text on an alarm card (bg-alarm/5)"],
    [t.critical, t.panel, "critical text on a panel"],
    [t["on-strong"], t.alarm, "alarm badge"],
    [t["on-strong"], t.critical, "critical badge"],
  ];
  const aa: Pair[] = [
    ...(["muted", "normal", "advisory", "warning", "stale"] as const).flatMap((k): Pair[] => [
      [t[k], t.panel, `text-${k} on bg-panel`],
      [t[k], t.surface, `text-${k} on bg-surface`],
    ]),
    [t.muted, tint(t.panel, t.alarm, 0.05), "muted text on an alarm card"],
    [t.ink, tint(t.panel, t.warning, 0.2), "text on a change-due strip (bg-warning/20)"],
    [t.ink, tint(t.panel, t.advisory, 0.1), "text on an advisory strip (bg-advisory/10)"],
    ...(["ink", "warning", "stale", "advisory"] as const).map((k): Pair => [t["on-strong"], t[k], `badge on bg-${k}`]),
  ];
  const focus: Pair[] = [
    [t.advisory, t.panel, "focus ring on a panel"],
    [t.advisory, t.surface, "focus ring on the page"],
    [t.control, t.panel, "a text field's or select's border on a panel"],
    [t.control, t.surface, "a text field's or select's border on the page"],
  ];
  return { aaa, aa, focus };
}

describe.each([
  ["light", light],
  ["dark", dark],
])("%s theme tokens (WCAG 2.2)", (_name, tokens) => {
  const { aaa, aa, focus } = pairs(tokens);
  it.each(aaa)("%s on %s — %s: at least 7:1 (SC 1.4.6, AAA)", (fg, bg) => {
    expect(wcagContrast(fg, bg)).toBeGreaterThanOrEqual(7);
  });
  it.each(aa)("%s on %s — %s: at least 4.5:1 (SC 1.4.3, AA)", (fg, bg) => {
    expect(wcagContrast(fg, bg)).toBeGreaterThanOrEqual(4.5);
  });
  it.each(focus)("%s on %s — %s: at least 3:1 (SC 1.4.11)", (fg, bg) => {
    expect(wcagContrast(fg, bg)).toBeGreaterThanOrEqual(3);
  });
});

describe("theme tokens", () => {
  it("the dark theme overrides every colour token, and the device's dark setting uses the same values", () => {
    const colourTokens = Object.keys(light).sort();
    expect(Object.keys(darkSwitch).sort()).toEqual(colourTokens);
    expect(darkDevice).toEqual(darkSwitch);
  });

  it("the contrast computation matches WCAG's own extremes: black on white 21:1, a colour on itself 1:1", () => {
    // WCAG 2.2 "contrast ratio" definition: (L1 + 0.05) / (L2 + 0.05), 21:1 for black on white.
    expect(wcagContrast("#000000", "#ffffff")).toBeCloseTo(21, 5);
    expect(wcagContrast("#777777", "#777777")).toBeCloseTo(1, 5);
    // #767676 on white is the well-known darkest-grey-that-passes-AA example, 4.54:1 (recalled, not verified).
    expect(wcagContrast("#767676", "#ffffff")).toBeCloseTo(4.54, 2);
  });
});
