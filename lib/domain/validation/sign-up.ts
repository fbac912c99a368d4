import { z } from "zod";
import { plainText, timeZone } from "./fields";
import { UNIT_SYSTEMS } from "../vocabulary";
import { email, newPassword, personName } from "./team";

export const signUpForm = z.object({ name: personName, email, password: newPassword });
export type SignUpInput = z.output<typeof signUpForm>;
export const verifyForm = z.object({ token: z.string().min(16).max(200) });
export const resendForm = z.object({});

/** Starting a farm from the phone: the time zone comes from the browser and is checked as IANA. */
export const startFarmForm = z.object({
  name: plainText("The farm's name", { min: 1, max: 80, empty: "Give the farm a name." }),
  unitSystem: z.enum(UNIT_SYSTEMS, { message: "Choose metric or imperial." }),
  timezone: timeZone,
});
/** Leaving a farm, deleting one (its name typed again), deleting one's account ("delete my account" typed). */
export const leaveFarmForm = z.object({ farmId: z.string().uuid() });
export const deleteFarmForm = z.object({ farmId: z.string().uuid(), confirm: z.string().max(200) });
export const DELETE_ACCOUNT_WORDS = "delete my account";
export const deleteAccountForm = z.object({ confirm: z.string().max(200) });
