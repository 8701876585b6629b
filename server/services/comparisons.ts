import { randomUUID } from "node:crypto";
import { and, desc, eq } from "drizzle-orm";
import {
  ComparisonSelectionSchema,
  CompareGroupBySchema,
  type Comparison,
  type CreateComparisonBody,
} from "@shared/schemas/compare";
import type { Db } from "../db/client";
import { comparisons, users } from "../db/schema";
import { conflict, notFound } from "../http-error";
import { checkSelection } from "./compare";

type ComparisonRow = typeof comparisons.$inferSelect & { createdByName: string | null };

function toComparison(r: ComparisonRow): Comparison {
  return {
    id: r.id,
    name: r.name,
    selection: ComparisonSelectionSchema.parse(r.selection),
    parameter: r.parameter,
    groupBy: CompareGroupBySchema.parse(r.groupBy),
    createdByName: r.createdByName,
    createdAt: new Date(r.createdAt).toISOString(),
  };
}

function selectComparisons(db: Db) {
  return db
    .select({
      id: comparisons.id,
      labId: comparisons.labId,
      name: comparisons.name,
      selection: comparisons.selection,
      parameter: comparisons.parameter,
      groupBy: comparisons.groupBy,
      createdBy: comparisons.createdBy,
      createdAt: comparisons.createdAt,
      createdByName: users.displayName,
    })
    .from(comparisons)
    .leftJoin(users, eq(users.id, comparisons.createdBy));
}

/**
 * The lab's saved comparisons, newest first.
 * @param db the database
 * @param labId the lab
 */
export function listComparisons(db: Db, labId: string): Comparison[] {
  return selectComparisons(db)
    .where(eq(comparisons.labId, labId))
    .orderBy(desc(comparisons.createdAt), desc(comparisons.id))
    .all()
    .map(toComparison);
}

/**
 * One saved comparison of the lab.
 * @throws HttpError 404 when it is not this lab's
 */
export function getComparison(db: Db, labId: string, comparisonId: string): Comparison {
  const row = selectComparisons(db)
    .where(and(eq(comparisons.labId, labId), eq(comparisons.id, comparisonId)))
    .get();
  if (!row) throw notFound("No such saved comparison in this lab");
  return toComparison(row);
}

/**
 * Saves a comparison (name, chosen batches and samples, parameter, grouping) as lab data.
 * @param db the database
 * @param labId the lab
 * @param userId who saves it
 * @param body the parsed request
 * @returns the stored comparison
 * @throws HttpError 404 when a chosen batch or sample is not this lab's; 409 when the lab already has a comparison of that name
 */
export function createComparison(db: Db, labId: string, userId: string, body: CreateComparisonBody): Comparison {
  checkSelection(db, labId, body.selection.batchIds, body.selection.sampleIds);
  const clash = db
    .select({ id: comparisons.id })
    .from(comparisons)
    .where(and(eq(comparisons.labId, labId), eq(comparisons.name, body.name)))
    .get();
  if (clash) throw conflict(`This lab already has a saved comparison named "${body.name}"`, [{ path: "name", message: "name taken" }]);
  const id = randomUUID();
  db.insert(comparisons)
    .values({
      id,
      labId,
      name: body.name,
      selection: { batchIds: [...new Set(body.selection.batchIds)], sampleIds: [...new Set(body.selection.sampleIds)] },
      parameter: body.parameter,
      groupBy: body.groupBy,
      createdBy: userId,
      createdAt: Date.now(),
    })
    .run();
  return getComparison(db, labId, id);
}

/**
 * Deletes a saved comparison (bundles built from it keep their own copy of the table).
 * @throws HttpError 404 when it is not this lab's
 */
export function deleteComparison(db: Db, labId: string, comparisonId: string): void {
  const res = db
    .delete(comparisons)
    .where(and(eq(comparisons.labId, labId), eq(comparisons.id, comparisonId)))
    .run();
  if (res.changes === 0) throw notFound("No such saved comparison in this lab");
}
