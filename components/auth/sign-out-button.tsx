"use client";

/** Pages this phone kept for a basement with no signal are this person's: they go at sign-out (the
 * service worker drops them too when it sees the sign-out). Entries waiting to send stay, and go
 * when the same person signs in again. */
async function forgetKeptPages() {
  if (!("caches" in window)) return;
  for (const name of await caches.keys()) if (name.startsWith("wormward-pages")) await caches.delete(name);
}

// next-auth's client is loaded on the tap, not with every signed-in page.
async function signOutHere() {
  await forgetKeptPages().catch((e: unknown) => console.warn("[wormward] could not forget the pages kept on this phone:", e));
  const { signOut } = await import("next-auth/react");
  await signOut({ callbackUrl: "/sign-in" });
}

export function SignOutButton() {
  return (
    <button type="button" onClick={() => void signOutHere()} className="min-h-11 rounded-lg px-2 underline-offset-4 hover:underline">
      Sign out
    </button>
  );
}
