"use client";

import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button type="button" onClick={() => signOut({ callbackUrl: "/sign-in" })} className="min-h-11 rounded-lg px-2 underline-offset-4 hover:underline">
      Sign out
    </button>
  );
}
