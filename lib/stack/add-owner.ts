// DATABASE_URL=… npx tsx lib/stack/add-owner.ts <e-mail> "<your name>" "<farm name>"
// Makes the first owner where there is no demo. The password is read from standard input (one
// line), so it stays out of the shell history and the process list.
import readline from "node:readline/promises";
import { ZodError } from "zod";
import { closeDb } from "@/db";
import { AppError } from "@/lib/domain/errors";
import { addFirstOwner } from "@/lib/server/farms/first-owner";

const [email, name, farm] = process.argv.slice(2);
if (!email || !name || !farm) {
  console.error('Usage: DATABASE_URL=… npx tsx lib/stack/add-owner.ts <e-mail> "<your name>" "<farm name>"  (password on standard input)');
  process.exit(2);
}
const rl = readline.createInterface({ input: process.stdin, output: process.stdin.isTTY ? process.stdout : undefined });
const password = await rl.question(process.stdin.isTTY ? "Password (10 to 72 characters): " : "");
rl.close();
try {
  const r = await addFirstOwner({ email, name, password, farm });
  console.log(`${r.email} owns ${r.farmName} (farm ${r.farmId}). Sign in at /sign-in.`);
} catch (e) {
  if (e instanceof ZodError) console.error(e.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("\n"));
  else if (e instanceof AppError) console.error(`${e.field ? `${e.field}: ` : ""}${e.message}`);
  else console.error(e);
  process.exitCode = 1;
} finally {
  await closeDb();
}
