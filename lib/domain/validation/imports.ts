import { z } from "zod";
import { MAX_IMPORT_BYTES, type ImportMapping } from "@/lib/domain/csv-import";
import { plainText } from "./fields";

export { importMapping } from "@/lib/domain/csv-import";

/** What an upload carries, from the form or from a script, once read. */
export type ImportUpload = { fileName: string; bytes: Uint8Array; mapping: ImportMapping };

export const IMPORT_TOO_LARGE = `The file is larger than ${MAX_IMPORT_BYTES / 1024 / 1024} MiB; split it and import the parts.`;

// The form's own fields add a few hundred bytes to the file; JSON escaping may add more.
export const MAX_UPLOAD_BODY = MAX_IMPORT_BYTES + 64 * 1024;

// A script may post JSON instead of a form: { fileName, csv, mapping: {...} }.
export const jsonUpload = z.object({
  fileName: plainText("The file name", { min: 1, max: 255 }),
  csv: z.string().min(1, "The file is empty."),
  mapping: z.record(z.string(), z.unknown()),
});
