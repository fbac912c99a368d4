import { z } from "zod";
import { PASSWORD_MAX_BYTES, PASSWORD_TOO_LONG, passwordBytes } from "@/lib/domain/password-rules";
import { ROLES } from "@/lib/domain/team-words";
import { plainText } from "./fields";

const uuid = z.string().uuid();
export const isUuid = (id: string) => uuid.safeParse(id).success;

const role = z.enum(ROLES, { message: "Choose owner, keeper or viewer." });
export const email = z.string().trim().toLowerCase().max(254, "That e-mail is too long.").email("Give an e-mail address like name@example.org.");
// Counted in UTF-8 bytes, as bcrypt counts them; the rest of a longer one would be ignored.
export const newPassword = z
  .string()
  .min(10, "Use at least 10 characters.")
  .refine((p) => passwordBytes(p) <= PASSWORD_MAX_BYTES, PASSWORD_TOO_LONG);
export const personName = plainText("Your name", { min: 1, max: 80, empty: "Tell the team your name." });

export const invitationCreate = z.object({ email, role });
export const roleChange = z.object({ role });
export type InvitationCreate = z.infer<typeof invitationCreate>;

// Forms post the farm and subject ids as hidden fields.
const id = z.string().uuid("Unknown id.");
export const inviteForm = invitationCreate.extend({ farmId: id });
export const revokeForm = z.object({ farmId: id, invitationId: id });
export const roleForm = z.object({ farmId: id, userId: id, role });
export const removeForm = z.object({ farmId: id, userId: id });

const token = z.string().min(16).max(200);
export const joinNewForm = z.object({ token, name: personName, password: newPassword });
export type JoinNew = z.infer<typeof joinNewForm>;
export const joinMeForm = z.object({ token });
export const forgotForm = z.object({ email });
export const resetForm = z.object({ token, password: newPassword });
