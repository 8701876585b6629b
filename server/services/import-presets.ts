import { randomUUID } from "node:crypto";
import { and, asc, eq } from "drizzle-orm";
import { ImportMappingSchema, type CreateImportPresetBody, type ImportPreset } from "@shared/schemas/ingest";
import type { Db } from "../db/client";
import { importPresets } from "../db/schema";
import { HttpError } from "../http-error";
import { audit } from "./audit";

type PresetRow = typeof importPresets.$inferSelect;

function toPreset(row: PresetRow): ImportPreset {
  return { id: row.id, name: row.name, mapping: ImportMappingSchema.parse(row.mapping), createdAt: new Date(row.createdAt).toISOString() };
}

/**
 * The lab's import presets, by name.
 * @param db the database
 * @param labId the lab
 * @returns presets (an empty list when the lab has none)
 */
export function listImportPresets(db: Db, labId: string): ImportPreset[] {
  return db.select().from(importPresets).where(eq(importPresets.labId, labId)).orderBy(asc(importPresets.name)).all().map(toPreset);
}

/**
 * Saves a named column map and unit set for the lab.
 * @param db the database
 * @param labId the lab
 * @param userId who saves it
 * @param input name and mapping (parsed CreateImportPresetBody)
 * @returns the preset
 * @throws HttpError 409 CONFLICT when the lab has a preset of that name
 */
export function createImportPreset(db: Db, labId: string, userId: string, input: CreateImportPresetBody): ImportPreset {
  const clash = db.select({ id: importPresets.id }).from(importPresets).where(and(eq(importPresets.labId, labId), eq(importPresets.name, input.name))).get();
  if (clash) {
    throw new HttpError(409, "CONFLICT", `This lab already has a preset named '${input.name}'`, [{ path: "name", message: "already used in this lab" }]);
  }
  const row: PresetRow = {
    id: randomUUID(),
    labId,
    name: input.name,
    mapping: input.mapping as unknown as Record<string, unknown>,
    createdBy: userId,
    createdAt: Date.now(),
  };
  db.transaction(() => {
    db.insert(importPresets).values(row).run();
    audit(db, { labId, userId, action: "import_preset.created", target: row.name });
  });
  return toPreset(row);
}

/**
 * Deletes a preset (runs already imported keep their own copy of the mapping).
 * @throws HttpError 404 when the preset is not in this lab
 */
export function deleteImportPreset(db: Db, labId: string, userId: string, presetId: string): void {
  const row = db.select().from(importPresets).where(and(eq(importPresets.labId, labId), eq(importPresets.id, presetId))).get();
  if (!row) throw new HttpError(404, "NOT_FOUND", "No such import preset in this lab");
  db.transaction(() => {
    db.delete(importPresets).where(eq(importPresets.id, row.id)).run();
    audit(db, { labId, userId, action: "import_preset.deleted", target: row.name });
  });
}
