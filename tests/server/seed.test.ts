import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { labs, memberships, users } from "../../server/db/schema";
import { DEMO_SEED_STEPS, seedDemo } from "../../server/db/seed";
import { verifyPassword } from "../../server/services/users";
import { testDb } from "../helpers/app";

describe("seedDemo", () => {
  it("makes one fictional lab, marked demo and synthetic, with a lead (site administrator), a researcher and a guest", async () => {
    const db = testDb();
    const { labId, userIds } = await seedDemo(db, { password: "one demo password" });
    const lab = db.select().from(labs).where(eq(labs.id, labId)).get()!;
    expect(lab.name).toMatch(/demo/i);
    expect(lab.organisation).toMatch(/fictional/i);
    expect(lab.organisation).toMatch(/synthetic/i);
    const roles = db
      .select({ email: users.email, role: memberships.role, isSiteAdmin: users.isSiteAdmin, hash: users.passwordHash })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.labId, labId))
      .all();
    expect(roles.map((r) => [r.email, r.role, r.isSiteAdmin]).sort()).toEqual([
      ["guest@example.org", "guest", false],
      ["lead@example.org", "lead", true],
      ["researcher@example.org", "researcher", false],
    ]);
    for (const r of roles) expect(await verifyPassword(r.hash, "one demo password")).toBe(true);
    expect(Object.keys(userIds).sort()).toEqual(["guest@example.org", "lead@example.org", "researcher@example.org"]);
  });

  it("runs its steps in one transaction: a failing later step leaves nothing behind", async () => {
    const db = testDb();
    DEMO_SEED_STEPS.push({
      name: "failing step",
      run() {
        throw new Error("step failed");
      },
    });
    try {
      await expect(seedDemo(db, { password: "one demo password" })).rejects.toThrow("step failed");
    } finally {
      DEMO_SEED_STEPS.pop();
    }
    expect(db.select().from(users).all()).toHaveLength(0);
    expect(db.select().from(labs).all()).toHaveLength(0);
  });
});
