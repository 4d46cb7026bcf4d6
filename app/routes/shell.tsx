import { useEffect, useRef } from "react";
import { Outlet, useLocation } from "react-router";
import type { Route } from "./+types/shell";
import { AppHeader, FlashBanner } from "~/components/AppHeader";
import { FocusFirstError } from "~/components/forms";
import { requirePermission } from "~/lib/auth.server";
import { useRootData } from "~/root";

export async function loader({ request }: Route.LoaderArgs) {
  // Guards only the shell's own data; every child route guards itself as well.
  const user = await requirePermission(request, "shop:read");
  return { user };
}

/**
 * After a page change inside the app, a focus left on nothing (the link that had it went with
 * the old page) moves to the new page's content, so the next Tab goes on from there rather than
 * from the top of the document. A field the page focuses itself, or a search hit's target that
 * takes the focus, is left alone. A full page load starts at the top, as browsers do.
 */
function useFocusMainOnNavigation() {
  const { key } = useLocation();
  const first = useRef(true);
  useEffect(() => {
    if (first.current) {
      first.current = false;
      return;
    }
    // A frame later: the control that led here may go only after the new page is in.
    const frame = requestAnimationFrame(() => {
      const active = document.activeElement;
      if (!active || active === document.body) document.getElementById("main")?.focus({ preventScroll: true });
    });
    return () => cancelAnimationFrame(frame);
  }, [key]);
}

export default function Shell({ loaderData }: Route.ComponentProps) {
  const root = useRootData();
  useFocusMainOnNavigation();
  return (
    <>
      <AppHeader user={loaderData.user} />
      <main id="main" tabIndex={-1} className="mx-auto max-w-6xl px-5 py-8 focus:outline-none">
        <FocusFirstError />
        <FlashBanner flash={root?.flash ?? null} />
        <Outlet />
      </main>
    </>
  );
}
