import { z } from "zod";
import { ROLES } from "@/lib/team-words";
import { plainText } from "./fields";

const uuid = z.string().uuid();
export const isUuid = (id: string) => uuid.safeParse(id).success;

const role = z.enum(ROLES, { message: "Choose owner, keeper or viewer." });
export const email = z.string().trim().toLowerCase().max(254, "That e-mail is too long.").email("Give an e-mail address like name@example.org.");
// Long passphrases are welcome; 200 matches the sign-in form's limit.
export const newPassword = z.string().min(10, "Use at least 10 characters.").max(200, "Use at most 200 characters.");
export const personName = plainText("Your name", { min: 1, max: 80, empty: "Tell the team your name." });

export const invitationCreate = z.object({ email, role });
export const roleChange = z.object({ role });

// Forms post the farm and subject ids as hidden fields.
const id = z.string().uuid("Unknown id.");
export const inviteForm = invitationCreate.extend({ farmId: id });
export const revokeForm = z.object({ farmId: id, invitationId: id });
export const roleForm = z.object({ farmId: id, userId: id, role });
export const removeForm = z.object({ farmId: id, userId: id });

const token = z.string().min(16).max(200);
export const joinNewForm = z.object({ token, name: personName, password: newPassword });
export const joinMeForm = z.object({ token });
export const forgotForm = z.object({ email });
export const resetForm = z.object({ token, password: newPassword });
