import type { ReactNode } from "react";

export function PageHeader({
  title,
  kicker,
  actions,
  children,
}: {
  title: string;
  kicker?: string;
  actions?: ReactNode;
  children?: ReactNode;
}) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-rule pb-4">
      <div className="min-w-0">
        {kicker && <p className="text-xs font-semibold uppercase tracking-[0.14em] text-brass">{kicker}</p>}
        <h1 className="text-3xl leading-tight">{title}</h1>
        {children && <div className="mt-2 text-graphite-soft">{children}</div>}
      </div>
      {actions && <div className="flex flex-wrap gap-2">{actions}</div>}
    </header>
  );
}

/** An honest empty state: says what is missing and, when there is one, what to do. */
export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-rule bg-card/60 px-6 py-10 text-center">
      <p className="font-serif text-lg">{title}</p>
      {children && <div className="mx-auto mt-2 max-w-md text-sm text-graphite-soft">{children}</div>}
    </div>
  );
}
