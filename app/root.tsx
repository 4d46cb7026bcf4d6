import {
  data,
  isRouteErrorResponse,
  Link,
  Links,
  Meta,
  Outlet,
  Scripts,
  ScrollRestoration,
  useLocation,
  useRouteLoaderData,
} from "react-router";
import type { Route } from "./+types/root";
import { config as zodConfig } from "zod";
import "./app.css";
import { getUser } from "./lib/auth.server";
import { clientEnv } from "./lib/env.server";
import { readFlash } from "./lib/flash.server";
import { securityMiddleware } from "./lib/http.server";
import { databaseOutageMiddleware } from "./lib/outage.server";

export const middleware: Route.MiddlewareFunction[] = [securityMiddleware, databaseOutageMiddleware];

// Two libraries would break the page's Content-Security-Policy (app/lib/csp.server.ts) unless told
// before their first use, which is why it happens here, in the first module the browser runs:
// - zod compiles object parsers with `new Function` when it can; without 'unsafe-eval' its probe
//   is a refused eval on every page, so it is told to interpret from the start;
// - video.js writes <style> elements for the player's size, which the policy refuses without the
//   nonce, unless this flag is set when its module loads (the watch page's lazy player); the
//   player takes its size from a class instead (Player.client.tsx).
declare global {
  interface Window {
    VIDEOJS_NO_DYNAMIC_STYLE?: boolean;
  }
}
if (typeof window !== "undefined") {
  zodConfig({ jitless: true });
  window.VIDEOJS_NO_DYNAMIC_STYLE = true;
}

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request }: Route.LoaderArgs) {
  // The root loader serves every page, signed in or not; each route guards itself.
  const [user, { flash, setCookie }] = await Promise.all([getUser(request), readFlash(request)]);
  return data({ user, flash, env: clientEnv() }, setCookie ? { headers: { "Set-Cookie": setCookie } } : undefined);
}

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen bg-paper text-graphite antialiased">
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

export function useRootData() {
  return useRouteLoaderData<typeof loader>("root");
}

const MESSAGES: Record<number, { title: string; body: string }> = {
  401: { title: "Please sign in", body: "This page is for the shop's staff. Sign in to continue." },
  403: { title: "Not for your role", body: "Your account cannot open or change this. Ask an admin if you need it." },
  404: { title: "Nothing at this address", body: "The page may have moved, or the link is mistyped." },
  400: { title: "Not understood", body: "Part of that request could not be read." },
  413: { title: "Too large", body: "That request was larger than the shop allows." },
  415: { title: "Not a form", body: "That was not sent as a form, the way a browser sends one." },
  503: {
    title: "Database unavailable",
    body: "The shop database is not answering. Try again in a minute; if it persists, tell the admin.",
  },
};

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const location = useLocation();
  let status = 500;
  let detail: string | undefined;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const d = error.data as { message?: string } | string | null;
    detail = typeof d === "string" ? d : (d?.message ?? undefined);
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.stack;
  }
  const msg = MESSAGES[status] ?? {
    title: "Something went wrong",
    body: "The error has been logged. Try again, or go back to the shop floor.",
  };
  const next = encodeURIComponent(location.pathname + location.search);
  return (
    <main className="mx-auto max-w-xl px-6 py-20">
      <title>{`${msg.title} · Benchreel`}</title>
      <p className="num text-sm font-semibold tracking-wide text-brass">Error {status}</p>
      <h1 className="mt-2 text-3xl">{msg.title}</h1>
      {/* A refusal's reason already says, in the shop's words, what the role can and cannot do
          and whom to ask (forbiddenReason in app/lib/permissions.ts): it replaces the general line. */}
      {status === 403 && detail ? (
        <p className="mt-4 text-graphite" data-testid="forbidden-reason">
          {detail}
        </p>
      ) : (
        <p className="mt-4 text-graphite-soft">{msg.body}</p>
      )}
      {detail && status !== 500 && status !== 403 && <p className="mt-3 text-graphite-soft">{detail}</p>}
      {detail && status === 500 && <pre className="mt-4 overflow-auto text-xs">{detail}</pre>}
      <div className="mt-8 flex gap-3">
        {status === 401 ? (
          <a className="btn btn-primary" href={`/signin?next=${next}`}>
            Sign in
          </a>
        ) : (
          <Link className="btn" to="/">
            Back to the shop floor
          </Link>
        )}
      </div>
    </main>
  );
}
