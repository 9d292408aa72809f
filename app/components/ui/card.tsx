export function Card({ className = "", ...props }: React.HTMLAttributes<HTMLElement> & { as?: "section" | "div" }) {
  return <section className={`rounded-xl border border-line bg-white p-5 shadow-sm ${className}`} {...props} />;
}

export function PageHeader({
  title,
  lead,
  actions,
}: {
  title: string;
  lead?: React.ReactNode;
  actions?: React.ReactNode;
}) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-semibold sm:text-3xl">{title}</h1>
        {lead && <p className="mt-1 text-ink-soft">{lead}</p>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </div>
  );
}
