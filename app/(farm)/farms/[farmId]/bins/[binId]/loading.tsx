export default function Loading() {
  return (
    <p className="text-soil-700 p-4" aria-live="polite">
      Loading the bin…
    </p>
  );
}
