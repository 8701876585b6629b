import type { Me } from "@shared/schemas/auth";

/** `next` when it is a path inside this app (never another site), else null: only those are followed after sign-in. */
export function safeNextPath(next: string | null): string | null {
  if (!next || !next.startsWith("/") || next.startsWith("//") || next.startsWith("/\\")) return null;
  return next;
}

/** The lab to open: the one remembered from last time if still a member, else the first membership. */
export function pickLab(me: Me, rememberedLabId: string | null): string | null {
  if (rememberedLabId && me.memberships.some((m) => m.labId === rememberedLabId)) return rememberedLabId;
  return me.memberships[0]?.labId ?? null;
}
