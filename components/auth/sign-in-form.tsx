"use client";

import { signIn } from "next-auth/react";
import { useState } from "react";
import { TextField } from "@/components/ui/form-parts";

export function SignInForm({ next }: { next: string }) {
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    const form = new FormData(e.currentTarget);
    const res = await signIn("credentials", {
      email: String(form.get("email") ?? ""),
      password: String(form.get("password") ?? ""),
      redirect: false,
    });
    setBusy(false);
    if (res?.ok && !res.error) window.location.assign(next);
    // next-auth's own code for a wrong e-mail or password; any other text is ours (the try limit).
    else setError(!res?.error || res.error === "CredentialsSignin" ? "That e-mail and password do not match an account." : res.error);
  }

  return (
    <form onSubmit={onSubmit} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <TextField label="E-mail" name="email" type="email" autoComplete="username" required inputMode="email" />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" required />
      <p aria-live="polite" className="min-h-6 text-clay-700">
        {error}
      </p>
      <button type="submit" disabled={busy} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {busy ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
