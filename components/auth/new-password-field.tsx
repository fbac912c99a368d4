import { TextField } from "@/components/ui/form-parts";

// The one field where a person chooses a password (joining a farm, after a reset); the byte limit
// itself is checked on the server (lib/domain/password-rules.ts).
export function NewPasswordField({ label, error }: { label: string; error?: string }) {
  return (
    <TextField
      label={label}
      hint="10 to 72 characters; a few words make a good one."
      error={error}
      name="password"
      type="password"
      autoComplete="new-password"
      required
      minLength={10}
    />
  );
}
