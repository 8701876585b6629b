import { randomUUID } from "node:crypto";
import { and, asc, count, eq } from "drizzle-orm";
import type { Batch } from "@shared/schemas/samples";
import type { Db } from "../db/client";
import { batches, samples } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";

type BatchRow = typeof batches.$inferSelect;

function toBatch(row: BatchRow, sampleCount: number): Batch {
  return {
    id: row.id,
    code: row.code,
    synthesisDate: row.synthesisDate,
    method: row.method,
    notes: row.notes,
    sampleCount,
    createdAt: new Date(row.createdAt).toISOString(),
  };
}

/**
 * The lab's batches, by code, each with its number of samples.
 * @param db the database
 * @param labId the lab
 * @returns batches sorted by code (an empty list when there are none)
 */
export function listBatches(db: Db, labId: string): Batch[] {
  const counts = new Map(
    db
      .select({ batchId: samples.batchId, n: count() })
      .from(samples)
      .where(eq(samples.labId, labId))
      .groupBy(samples.batchId)
      .all()
      .map((r) => [r.batchId, r.n]),
  );
  return db
    .select()
    .from(batches)
    .where(eq(batches.labId, labId))
    .orderBy(asc(batches.code))
    .all()
    .map((r) => toBatch(r, counts.get(r.id) ?? 0));
}

/**
 * One batch of the lab.
 * @throws HttpError 404 when the batch is not in this lab
 */
export function getBatchRow(db: Db, labId: string, batchId: string): BatchRow {
  const row = db.select().from(batches).where(and(eq(batches.labId, labId), eq(batches.id, batchId))).get();
  if (!row) throw new HttpError(404, "NOT_FOUND", "No such batch in this lab", [{ path: "batchId", message: "no such batch" }]);
  return row;
}

/**
 * Creates a batch.
 * @param db the database
 * @param labId the lab
 * @param userId who creates it
 * @param input the parsed CreateBatchBody (synthesisDate already YYYY-MM-DD or null)
 * @returns the new batch
 * @throws HttpError 409 CONFLICT when the lab already has a batch with this code
 */
export function createBatch(
  db: Db,
  labId: string,
  userId: string,
  input: { code: string; synthesisDate: string | null; method: string; notes: string },
): Batch {
  const clash = db
    .select({ id: batches.id })
    .from(batches)
    .where(and(eq(batches.labId, labId), eq(batches.code, input.code)))
    .get();
  if (clash) {
    throw new HttpError(409, "CONFLICT", `This lab already has a batch coded '${input.code}'`, [
      { path: "code", message: "already used in this lab" },
    ]);
  }
  const row: BatchRow = {
    id: randomUUID(),
    labId,
    code: input.code,
    synthesisDate: input.synthesisDate,
    method: input.method,
    notes: input.notes,
    createdBy: userId,
    createdAt: Date.now(),
  };
  // better-sqlite3 transactions are synchronous on the one connection: statements on `db` belong to it.
  db.transaction(() => {
    db.insert(batches).values(row).run();
    audit(db, { labId, userId, action: "batch.created", target: row.code });
  });
  return toBatch(row, 0);
}

