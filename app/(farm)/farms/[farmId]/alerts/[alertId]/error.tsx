"use client";

export default function AlertsError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div role="alert" className="m-4 rounded-2xl bg-clay-100 p-4 ring-1 ring-clay-500">
      <h2 className="font-bold">The alerts could not load.</h2>
      <p className="text-sm">{error.digest ? `Reference ${error.digest}. ` : ""}Nothing was changed; try again.</p>
      <button onClick={reset} className="mt-3 min-h-11 rounded-lg bg-soil-800 px-4 text-white">
        Try again
      </button>
    </div>
  );
}
