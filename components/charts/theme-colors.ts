import { useSyncExternalStore } from "react";

// uPlot draws on a canvas, where CSS classes do not reach: charts read the palette's variables
// (app/globals.css) when they draw, and draw again when the phone switches between light and dark.
const DARK = "(prefers-color-scheme: dark)";

function subscribe(onChange: () => void) {
  const m = window.matchMedia(DARK);
  m.addEventListener("change", onChange);
  return () => m.removeEventListener("change", onChange);
}

/** "light" or "dark", following the phone's setting; "light" on the server. */
export function useColorScheme(): "light" | "dark" {
  return useSyncExternalStore(
    subscribe,
    () => (window.matchMedia(DARK).matches ? "dark" : "light"),
    () => "light",
  );
}

/** A palette variable's colour now ("--color-clay-500" → "#b5523b"); anything else as given. */
export function paletteColor(name: string): string {
  if (!name.startsWith("--")) return name;
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || "#8a6a50";
}

/** A #rrggbb colour with an alpha. */
export function withAlpha(hex: string, a: number) {
  const n = parseInt(hex.slice(1), 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${a})`;
}
