/** An area of the app whose screens are not built yet: says so plainly instead of a blank page. */
export function ComingArea({ title, text }: { title: string; text: string }) {
  return (
    <main className="max-w-2xl">
      <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
      <div className="mt-6 rounded-lg border border-dashed border-neutral-300 bg-white p-6 text-neutral-600">
        {text}
      </div>
    </main>
  );
}
