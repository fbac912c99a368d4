/** Whether a PATCH names anything to change; drizzle refuses an UPDATE with an empty SET. */
export const hasChanges = (patch: Record<string, unknown>) => Object.values(patch).some((v) => v !== undefined);
