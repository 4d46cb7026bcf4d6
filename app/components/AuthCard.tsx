import type { ReactNode } from "react";
import { Wordmark } from "./AppHeader";
import { FocusFirstError } from "./forms";

export function AuthCard({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <main className="flex min-h-screen items-start justify-center px-5 py-16">
      <div className="w-full max-w-md">
        <div className="mb-8 flex justify-center">
          <Wordmark />
        </div>
        <div className="card">
          <FocusFirstError />
          <h1 className="mb-5 text-2xl">{title}</h1>
          {children}
        </div>
        {footer && <div className="mt-4 text-center text-sm text-graphite-soft">{footer}</div>}
      </div>
    </main>
  );
}
