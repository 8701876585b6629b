const KEY = "thetafold.last-lab";

/** The lab this browser last opened (a hint for "/", checked against the memberships before use). */
export function readLastLab(): string | null {
  try {
    return window.localStorage.getItem(KEY);
  } catch {
    return null;
  }
}

export function rememberLastLab(labId: string): void {
  try {
    window.localStorage.setItem(KEY, labId);
  } catch {
    // storage off: "/" then opens the first lab
  }
}
