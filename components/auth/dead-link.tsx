// The page a used, expired or unknown link lands on: what happened and the one next step.
export function DeadLink({ title, message, next }: { title: string; message: string; next: { href: string; label: string } }) {
  return (
    <div role="alert" className="space-y-4 rounded-2xl bg-white p-5 ring-1 ring-soil-300">
      <h1 className="text-2xl font-bold">{title}</h1>
      <p className="text-soil-700">{message}</p>
      <a href={next.href} className="flex h-14 items-center justify-center rounded-xl bg-soil-800 text-lg font-bold text-white">
        {next.label}
      </a>
    </div>
  );
}
