import { Outlet } from "react-router";
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

export default function Shell({ loaderData }: Route.ComponentProps) {
  const root = useRootData();
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
