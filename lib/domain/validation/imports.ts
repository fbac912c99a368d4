import { z } from "zod";
import { importMapping, MAX_IMPORT_BYTES, type ImportMapping } from "@/lib/domain/csv-import";
import { mediaType, readCappedBody } from "@/lib/web/api/body";
import { AppError, readJson } from "@/lib/web/errors";
import { hasControl, plainText } from "./fields";

export type ImportUpload = { fileName: string; bytes: Uint8Array; mapping: ImportMapping };

const tooLarge = () => new AppError("too_large", `The file is larger than ${MAX_IMPORT_BYTES / 1024 / 1024} MiB; split it and import the parts.`, "file");

// A script may post JSON instead of a form: { fileName, csv, mapping: {...} }.
const jsonUpload = z.object({
  fileName: plainText("The file name", { min: 1, max: 255 }),
  csv: z.string().min(1, "The file is empty."),
  mapping: z.record(z.string(), z.unknown()),
});

// The form's own fields add a few hundred bytes to the file; JSON escaping may add more.
const MAX_UPLOAD_BODY = MAX_IMPORT_BYTES + 64 * 1024;

/** An upload from the form (multipart: file + one field per mapping choice) or from a script (JSON). */
export async function readImportUpload(req: Request): Promise<ImportUpload> {
  const type = mediaType(req.headers.get("content-type"));
  if (type === "application/json") {
    const body = jsonUpload.parse(await readJson(req, MAX_UPLOAD_BODY));
    const bytes = new TextEncoder().encode(body.csv);
    if (bytes.byteLength > MAX_IMPORT_BYTES) throw tooLarge();
    return { fileName: body.fileName, bytes, mapping: importMapping.parse(body.mapping) };
  }
  if (type !== "multipart/form-data") {
    throw new AppError("unsupported_media", "Upload the file as multipart/form-data (a form) or JSON { fileName, csv, mapping }.");
  }
  // Read with the cap first, then parse the form from what was read: Request.formData() would
  // read the whole body, however long, before we could look at the file's size.
  const body = await readCappedBody(req, MAX_UPLOAD_BODY);
  if (!body.ok) throw tooLarge();
  let form: FormData;
  try {
    form = await new Response(new Uint8Array(body.bytes), { headers: { "content-type": req.headers.get("content-type")! } }).formData();
  } catch {
    throw new AppError("bad_request", "The form could not be read.");
  }
  const file = form.get("file");
  if (!(file instanceof Blob) || file.size === 0) throw new AppError("invalid", "Choose a CSV file.", "file");
  if (file.size > MAX_IMPORT_BYTES) throw tooLarge();
  const fields = Object.fromEntries([...form.entries()].filter(([k, v]) => k !== "file" && typeof v === "string"));
  const mapping = importMapping.parse(fields);
  const fileName = ("name" in file && typeof file.name === "string" && file.name.trim()) || "upload.csv";
  // The name is kept with the import and its report; PostgreSQL cannot store U+0000 in it.
  if (hasControl(fileName)) throw new AppError("invalid", "The file name has a control character in it; rename the file and upload it again.", "file");
  return { fileName, bytes: new Uint8Array(await file.arrayBuffer()), mapping };
}
