/** Page title with an optional line under it; the same on every signed-in page. */
export function PageHeader({ title, lead }: { title: string; lead?: React.ReactNode }) {
  return (
    <div className="mb-8">
      <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
      {lead ? <p className="mt-2 max-w-3xl text-neutral-600">{lead}</p> : null}
    </div>
  );
}

export function Card({
  title,
  children,
  id,
}: {
  title: string;
  children: React.ReactNode;
  id?: string;
}) {
  const headingId = id ? `${id}-title` : undefined;
  return (
    <section
      aria-labelledby={headingId}
      className="rounded-lg border border-neutral-200 bg-white p-4 shadow-xs sm:p-6"
    >
      <h2 id={headingId} className="text-base font-semibold">
        {title}
      </h2>
      <div className="mt-4">{children}</div>
    </section>
  );
}

/** A smaller panel with a muted heading: one figure group of a drive log's summary. */
export function Tile({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="rounded-lg border border-neutral-200 bg-white p-5 shadow-xs">
      <h3 className="text-sm font-semibold text-neutral-500">{title}</h3>
      <div className="mt-2">{children}</div>
    </section>
  );
}

/** A term and its value on one line, in a <dl> of facts (a drive log's test details). */
export function InlineTerm({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div className="flex gap-1.5">
      <dt className="text-neutral-500">{term}</dt>
      <dd className="font-medium text-neutral-900">{children}</dd>
    </div>
  );
}

/** What an empty list says instead of showing nothing: what it is and what to do next. */
export function EmptyState({ children }: { children: React.ReactNode }) {
  return (
    <p className="rounded-md border border-dashed border-neutral-300 px-4 py-6 text-center text-sm text-neutral-600">
      {children}
    </p>
  );
}

/** A success message after a form post, announced politely. */
export function Notice({ children }: { children: React.ReactNode }) {
  return (
    <p
      role="status"
      className="mb-6 rounded-md border border-green-200 bg-green-50 px-4 py-2 text-sm text-green-900"
    >
      {children}
    </p>
  );
}

export const tableClass = "w-full text-left text-sm";
export const thClass = "border-b border-neutral-200 py-2 pr-4 font-medium text-neutral-500";
export const tdClass = "border-b border-neutral-100 py-2.5 pr-4";

/**
 * A table's header row: the column names, then (with `action`) a last column for each row's
 * button, named for screen readers only.
 */
export function TableHead({ columns, action }: { columns: string[]; action?: string }) {
  return (
    <thead>
      <tr>
        {columns.map((c) => (
          <th key={c} className={thClass}>
            {c}
          </th>
        ))}
        {action ? (
          <th className={thClass}>
            <span className="sr-only">{action}</span>
          </th>
        ) : null}
      </tr>
    </thead>
  );
}

// Made once: toLocaleString with options builds a new formatter on every call, which was a few
// per cent of a drive-log page's server time (its tables show a date per row).
const dayFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeZone: "UTC" });
const timeFormat = new Intl.DateTimeFormat("en-GB", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

/** Dates in the UI: day, month, year and (unless dateOnly) the time, in UTC. */
export function When({
  date,
  dateOnly = false,
}: {
  date: Date | string | null;
  dateOnly?: boolean;
}) {
  if (!date) return <>—</>;
  const d = new Date(date);
  // UTC on server and browser alike, so the two renders agree and teams in several time
  // zones read the same time.
  const text = dateOnly ? dayFormat.format(d) : `${timeFormat.format(d)} UTC`;
  return <time dateTime={d.toISOString()}>{text}</time>;
}
