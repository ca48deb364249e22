"use client";

import { useState } from "react";
import { THEME_COOKIE, themeAttribute, themeChoiceLabels, themeChoices, type ThemeChoice } from "@/lib/theme";

/** Light, dark or the device's setting; applied at once and remembered for a year in a cookie. */
export function ThemeSwitch({ initial }: { initial: ThemeChoice }) {
  const [choice, setChoice] = useState(initial);
  const choose = (next: ThemeChoice) => {
    setChoice(next);
    const attr = themeAttribute(next);
    if (attr) document.documentElement.dataset.theme = attr;
    else delete document.documentElement.dataset.theme;
    document.cookie = `${THEME_COOKIE}=${next}; path=/; max-age=31536000; samesite=lax`;
  };
  return (
    <label className="flex items-center gap-1 text-sm text-muted">
      <span>Theme</span>
      <select
        value={choice}
        onChange={(e) => choose(e.target.value as ThemeChoice)}
        className="min-h-11 rounded border border-line bg-panel px-2 text-ink"
        data-testid="theme-switch"
      >
        {themeChoices.map((c) => (
          <option key={c} value={c}>
            {themeChoiceLabels[c]}
          </option>
        ))}
      </select>
    </label>
  );
}
