import { MAX_IMPORT_BYTES } from "@/lib/domain/csv-import";
import { hasControl } from "@/lib/domain/validation/fields";
import { IMPORT_TOO_LARGE, importMapping, jsonUpload, MAX_UPLOAD_BODY, type ImportUpload } from "@/lib/domain/validation/imports";
import { mediaType, readCappedBody } from "./api/body";
import { AppError, readJson } from "./errors";

const tooLarge = () => new AppError("too_large", IMPORT_TOO_LARGE, "file");

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
