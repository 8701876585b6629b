import type { Role } from "@shared/schemas/auth";
import { Badge, type BadgeTone } from "@/components/ui/badge";
import { ROLE_LABELS } from "../utils";

const TONE: Record<Role, BadgeTone> = { lead: "ember", researcher: "frost", guest: "neutral" };

export function RoleBadge({ role }: { role: Role }) {
  return <Badge tone={TONE[role]}>{ROLE_LABELS[role]}</Badge>;
}
