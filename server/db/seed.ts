import { randomUUID } from "node:crypto";
import type { Role } from "@shared/schemas/auth";
import { hashPassword } from "../services/users";
import type { Db } from "./client";
import { seedDemoRuns } from "./seed-demo-runs";
import { seedDemoFits } from "./seed-demo-fits";
import { labs, memberships, users } from "./schema";

/*
 * Demo data for a fresh install. Everything here is invented: the lab, its organisation and its people are
 * fictional and labelled synthetic. Later features add samples, runs and fits as further steps in DEMO_SEED_STEPS.
 */

export const DEMO_LAB = {
  name: "Low-Temperature Calorimetry Group (demo)",
  organisation: "Fenwick Hollow Institute of Solid-State Science — fictional; all demo data are synthetic",
  contactEmail: "lead@example.org",
} as const;

export const DEMO_PEOPLE: readonly { email: string; displayName: string; role: Role; isSiteAdmin: boolean }[] = [
  { email: "lead@example.org", displayName: "Dr. Ilse Marrow (demo lead)", role: "lead", isSiteAdmin: true },
  { email: "researcher@example.org", displayName: "Tobin Achterberg (demo researcher)", role: "researcher", isSiteAdmin: false },
  { email: "guest@example.org", displayName: "Noor Vasquez-Lind (demo guest)", role: "guest", isSiteAdmin: false },
];

/** What earlier steps made, for the steps after them. */
export interface SeedContext {
  passwordHash: string;
  now: number;
  labId?: string;
  /** User id by e-mail. */
  userIds: Record<string, string>;
}

export interface SeedStep {
  name: string;
  run(db: Db, ctx: SeedContext): void;
}

/** The demo lab and its three people (lead@example.org is also site administrator). */
export const seedLabAndPeople: SeedStep = {
  name: "lab and people",
  run(db, ctx) {
    const labId = randomUUID();
    db.insert(labs).values({ id: labId, ...DEMO_LAB, createdAt: ctx.now }).run();
    for (const p of DEMO_PEOPLE) {
      const id = randomUUID();
      db.insert(users)
        .values({ id, email: p.email, displayName: p.displayName, passwordHash: ctx.passwordHash, isSiteAdmin: p.isSiteAdmin, createdAt: ctx.now })
        .run();
      db.insert(memberships).values({ labId, userId: id, role: p.role, createdAt: ctx.now }).run();
      ctx.userIds[p.email] = id;
    }
    ctx.labId = labId;
  },
};

/** Steps run in this order, in one transaction. Later issues append theirs (samples, runs, fits). */
export const DEMO_SEED_STEPS: SeedStep[] = [seedLabAndPeople, seedDemoRuns, seedDemoFits];

/**
 * Seeds the demo lab into a database (call it only when there are no users yet; startServer checks).
 * All steps run in one transaction: a failing step leaves nothing behind.
 * @param db the database
 * @param options the one password of the three demo accounts
 * @returns the demo lab id and the e-mail → user id map
 */
export async function seedDemo(db: Db, options: { password: string }): Promise<{ labId: string; userIds: Record<string, string> }> {
  const ctx: SeedContext = { passwordHash: await hashPassword(options.password), now: Date.now(), userIds: {} };
  db.transaction(() => {
    for (const step of DEMO_SEED_STEPS) step.run(db, ctx);
  });
  return { labId: ctx.labId!, userIds: ctx.userIds };
}
