export default function Loading() {
  return <p className="text-soil-700 p-4">Loading the farm…</p>;
}
