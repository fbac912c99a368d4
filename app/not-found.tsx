import Link from "next/link";
export default function NotFound() {
  return (
    <main className="mx-auto max-w-md p-6">
      <h1 className="text-2xl font-bold">Not here</h1>
      <p className="mt-2 text-soil-700">That page does not exist, or it belongs to a farm you are not on.</p>
      <Link href="/" className="mt-4 inline-block min-h-11 rounded-lg bg-soil-800 px-4 py-3 text-white">
        Back to Today
      </Link>
    </main>
  );
}
