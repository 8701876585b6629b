import { z } from "zod";
import { ImportPresetSchema } from "./ingest";
import { LabParams } from "./labs";

/*
 * Import presets: a lab's named column maps and unit sets. The preset itself and its create body are
 * ImportPresetSchema and CreateImportPresetBody in ./ingest (the reader's mapping lives there); this file
 * adds the route parameters and the list response.
 */

export const ImportPresetParams = LabParams.extend({ presetId: z.string().min(1).max(64) });
export type ImportPresetParams = z.infer<typeof ImportPresetParams>;

/** GET /api/labs/:labId/import-presets: the lab's presets by name. */
export const ImportPresetListSchema = z.array(ImportPresetSchema);
export type ImportPresetList = z.infer<typeof ImportPresetListSchema>;
