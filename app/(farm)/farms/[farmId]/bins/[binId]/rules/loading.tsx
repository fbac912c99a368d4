export default function Loading() {
  return (
    <p className="p-4 text-soil-700" aria-live="polite">
      Loading the alert rules…
    </p>
  );
}
