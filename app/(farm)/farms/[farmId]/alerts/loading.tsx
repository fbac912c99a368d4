export default function Loading() {
  return <p className="p-4 text-soil-700">Loading the alerts…</p>;
}
