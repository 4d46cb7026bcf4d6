import { Form, Link, NavLink } from "react-router";
import type { SessionUser } from "~/lib/auth.server";
import { navFor } from "~/lib/nav";
import { ROLE_LABELS } from "~/lib/permissions";
import { HeaderSearch } from "./search/HeaderSearch";

export function Wordmark() {
  return (
    <Link to="/" className="flex items-center gap-2 no-underline" aria-label="Benchreel, shop floor">
      <svg aria-hidden width="28" height="28" viewBox="0 0 32 32">
        <rect width="32" height="32" rx="6" fill="#2b2a27" />
        <circle cx="16" cy="16" r="9" fill="none" stroke="#c9953a" strokeWidth="3" />
        <circle cx="16" cy="16" r="3" fill="#f7f2e8" />
        <path d="M16 4v5M16 23v5M4 16h5M23 16h5" stroke="#c9953a" strokeWidth="2" />
      </svg>
      <span className="font-serif text-xl font-semibold text-graphite">Benchreel</span>
    </Link>
  );
}

export function AppHeader({ user, searchSlot }: { user: SessionUser; searchSlot?: React.ReactNode }) {
  const items = navFor(user.role);
  return (
    <header className="no-print border-b border-rule bg-paper-deep/70">
      {/* The first Tab of every page offers to jump past the header and the menu. */}
      <a href="#main" className="btn sr-only focus:not-sr-only focus:absolute focus:left-3 focus:top-3 focus:z-50">
        Skip to the page
      </a>
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-3 px-5 pt-3">
        <Wordmark />
        <div className="order-3 w-full md:order-none md:w-auto md:flex-1">{searchSlot ?? <HeaderSearch />}</div>
        <div className="ml-auto flex items-center gap-3 text-sm">
          <Link to="/account" className="text-right leading-tight text-graphite no-underline hover:underline">
            <span className="block font-semibold" data-testid="user-name">
              {user.name}
            </span>
            <span className="block text-xs text-graphite-soft" data-testid="user-role">
              {ROLE_LABELS[user.role]}
            </span>
          </Link>
          <Form method="post" action="/signout">
            <button type="submit" className="btn py-1.5">
              Sign out
            </button>
          </Form>
        </div>
      </div>
      <nav aria-label="Main" className="mx-auto max-w-6xl px-3">
        <ul className="flex flex-wrap gap-1 pt-2" data-testid="main-nav">
          {items.map((item) => (
            <li key={item.to}>
              <NavLink
                to={item.to}
                end={item.end}
                className={({ isActive }) =>
                  `block rounded-t-md border-b-2 px-3 py-2 text-sm font-semibold no-underline ${
                    isActive ? "border-brass bg-paper text-graphite" : "border-transparent text-graphite-soft hover:text-graphite"
                  }`
                }
              >
                {item.label}
              </NavLink>
            </li>
          ))}
        </ul>
      </nav>
    </header>
  );
}

const FLASH_TONES = {
  ok: "border-ok/40 bg-ok-soft text-ok",
  error: "border-spec-red/40 bg-spec-red-soft text-spec-red",
  out: "border-spec-red/60 bg-spec-red-soft text-spec-red",
  caution: "border-brass/60 bg-brass-soft/60 text-graphite",
} as const;

export function FlashBanner({ flash }: { flash: { kind: keyof typeof FLASH_TONES; message: string } | null }) {
  if (!flash) return null;
  const tone = FLASH_TONES[flash.kind] ?? FLASH_TONES.ok;
  return (
    <div
      role="status"
      className={`mb-6 rounded-md border px-4 py-3 text-sm font-semibold ${tone}`}
      data-testid="flash"
      data-kind={flash.kind}
    >
      {flash.message}
    </div>
  );
}
