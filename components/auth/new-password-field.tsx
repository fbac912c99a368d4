// The one field where a person chooses a password (joining a farm, after a reset); the byte limit
// itself is checked on the server (lib/domain/password-rules.ts).
export function NewPasswordField({ label, error }: { label: string; error?: string }) {
  return (
    <label className="block">
      <span className="mb-1 block font-bold">{label}</span>
      <span className="block text-sm text-soil-700">10 to 72 characters; a few words make a good one.</span>
      <input
        name="password"
        type="password"
        autoComplete="new-password"
        required
        minLength={10}
        aria-invalid={!!error}
        className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
      />
      {error && <span className="text-sm text-clay-700">{error}</span>}
    </label>
  );
}
