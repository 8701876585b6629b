import type { ResolvedTheme } from "./settings";

/**
 * The eight colours of Okabe & Ito, "Color Universal Design: how to make figures and presentations that are
 * friendly to colorblind people" (2008, jfly.uni-koeln.de/color), in their published order, as sRGB hex.
 */
export const OKABE_ITO = {
  black: "#000000",
  orange: "#E69F00",
  skyBlue: "#56B4E9",
  bluishGreen: "#009E73",
  yellow: "#F0E442",
  blue: "#0072B2",
  vermillion: "#D55E00",
  reddishPurple: "#CC79A7",
} as const;

/**
 * Series colours for charts, one per batch or run, in the order to hand them out.
 * Light backgrounds: yellow goes last (it has barely 1.2:1 against white). Dark backgrounds: black is swapped for a
 * light grey (common practice, no source) and the deep blue goes last for the same reason.
 */
export const SERIES_PALETTE: Record<ResolvedTheme, readonly string[]> = {
  light: [
    OKABE_ITO.blue,
    OKABE_ITO.vermillion,
    OKABE_ITO.bluishGreen,
    OKABE_ITO.reddishPurple,
    OKABE_ITO.orange,
    OKABE_ITO.skyBlue,
    OKABE_ITO.black,
    OKABE_ITO.yellow,
  ],
  dark: [
    OKABE_ITO.skyBlue,
    OKABE_ITO.orange,
    OKABE_ITO.bluishGreen,
    OKABE_ITO.reddishPurple,
    OKABE_ITO.yellow,
    OKABE_ITO.vermillion,
    "#E4E1DC",
    OKABE_ITO.blue,
  ],
};

/** The colour of series `index` (0-based, wraps after eight) for a theme. */
export function seriesColor(index: number, theme: ResolvedTheme): string {
  const palette = SERIES_PALETTE[theme];
  return palette[((index % palette.length) + palette.length) % palette.length];
}
