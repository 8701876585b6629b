import { createContext, useCallback, useContext, useEffect, useLayoutEffect, useMemo, useState, type ReactNode } from "react";
import type { UncertaintyStyle } from "./format-uncertainty";

export type ThemeChoice = "system" | "light" | "dark";
export type ResolvedTheme = "light" | "dark";

const THEME_KEY = "thetafold.theme";
const UNCERTAINTY_KEY = "thetafold.uncertainty-style";

export const THEME_CHOICES: readonly { value: ThemeChoice; label: string }[] = [
  { value: "system", label: "Match the system" },
  { value: "light", label: "Light" },
  { value: "dark", label: "Dark" },
];

export const UNCERTAINTY_STYLES: readonly { value: UncertaintyStyle; label: string; example: string }[] = [
  { value: "parenthesis", label: "Concise", example: "342.8(1.2) K" },
  { value: "plus-minus", label: "Plus–minus", example: "342.8 ± 1.2 K" },
];

function readStored<T extends string>(key: string, allowed: readonly T[], fallback: T): T {
  try {
    const stored = window.localStorage.getItem(key);
    return stored !== null && (allowed as readonly string[]).includes(stored) ? (stored as T) : fallback;
  } catch {
    return fallback; // storage can be off (private windows, strict policies): settings then last for the visit
  }
}

function store(key: string, value: string): void {
  try {
    window.localStorage.setItem(key, value);
  } catch {
    // see readStored
  }
}

function systemPrefersDark(): boolean {
  return typeof window.matchMedia === "function" && window.matchMedia("(prefers-color-scheme: dark)").matches;
}

interface Settings {
  theme: ThemeChoice;
  resolvedTheme: ResolvedTheme;
  setTheme(theme: ThemeChoice): void;
  uncertaintyStyle: UncertaintyStyle;
  setUncertaintyStyle(style: UncertaintyStyle): void;
}

const SettingsContext = createContext<Settings | null>(null);

/** Holds the per-browser display settings (theme, uncertainty notation), remembered in localStorage. */
export function SettingsProvider({ children }: { children: ReactNode }) {
  const [theme, setThemeState] = useState<ThemeChoice>(() =>
    readStored(THEME_KEY, ["system", "light", "dark"] as const, "system"),
  );
  const [uncertaintyStyle, setStyleState] = useState<UncertaintyStyle>(() =>
    readStored(UNCERTAINTY_KEY, ["parenthesis", "plus-minus"] as const, "parenthesis"),
  );
  const [prefersDark, setPrefersDark] = useState(systemPrefersDark);

  useEffect(() => {
    if (typeof window.matchMedia !== "function") return;
    const query = window.matchMedia("(prefers-color-scheme: dark)");
    const onChange = () => setPrefersDark(query.matches);
    query.addEventListener("change", onChange);
    return () => query.removeEventListener("change", onChange);
  }, []);

  // Another tab changed a setting: follow it.
  useEffect(() => {
    const onStorage = (event: StorageEvent) => {
      if (event.key === THEME_KEY) setThemeState(readStored(THEME_KEY, ["system", "light", "dark"] as const, "system"));
      if (event.key === UNCERTAINTY_KEY)
        setStyleState(readStored(UNCERTAINTY_KEY, ["parenthesis", "plus-minus"] as const, "parenthesis"));
    };
    window.addEventListener("storage", onStorage);
    return () => window.removeEventListener("storage", onStorage);
  }, []);

  const resolvedTheme: ResolvedTheme = theme === "system" ? (prefersDark ? "dark" : "light") : theme;

  // Before paint, so the page never shows one frame in the other theme.
  useLayoutEffect(() => {
    const root = document.documentElement;
    root.dataset.theme = resolvedTheme;
    root.style.colorScheme = resolvedTheme;
  }, [resolvedTheme]);

  const setTheme = useCallback((next: ThemeChoice) => {
    setThemeState(next);
    store(THEME_KEY, next);
  }, []);
  const setUncertaintyStyle = useCallback((next: UncertaintyStyle) => {
    setStyleState(next);
    store(UNCERTAINTY_KEY, next);
  }, []);

  const value = useMemo(
    () => ({ theme, resolvedTheme, setTheme, uncertaintyStyle, setUncertaintyStyle }),
    [theme, resolvedTheme, setTheme, uncertaintyStyle, setUncertaintyStyle],
  );
  return <SettingsContext.Provider value={value}>{children}</SettingsContext.Provider>;
}

/** The display settings; outside a SettingsProvider (isolated component tests) the defaults, read-only. */
export function useSettings(): Settings {
  const context = useContext(SettingsContext);
  if (context) return context;
  return {
    theme: "system",
    resolvedTheme: "light",
    setTheme: () => undefined,
    uncertaintyStyle: "parenthesis",
    setUncertaintyStyle: () => undefined,
  };
}
