// The colour theme a viewer picked: light, dark, or whatever the device is set to
// (`prefers-color-scheme`). Remembered in a cookie so the server renders the right theme
// on the first paint, with no script and no flash of the other one.

export const themeChoices = ["system", "light", "dark"] as const;
export type ThemeChoice = (typeof themeChoices)[number];

export const THEME_COOKIE = "liftline-theme";

export const themeChoiceLabels: Record<ThemeChoice, string> = {
  system: "Follow device",
  light: "Light",
  dark: "Dark",
};

export function parseThemeChoice(value: string | undefined | null): ThemeChoice {
  return (themeChoices as readonly string[]).includes(value ?? "") ? (value as ThemeChoice) : "system";
}

/** The `data-theme` attribute for `<html>`: none when the device decides (the CSS media query applies). */
export function themeAttribute(choice: ThemeChoice): "light" | "dark" | undefined {
  return choice === "system" ? undefined : choice;
}
