import { redirect } from "react-router";
import type { Route } from "./+types/signout";
import { signOut } from "~/lib/auth.server";

// Signing out is a POST (a GET could be triggered by any page); a GET just goes home.
export async function loader() {
  throw redirect("/");
}

export async function action({ request }: Route.ActionArgs) {
  const cookie = await signOut(request);
  throw redirect("/signin", { headers: { "Set-Cookie": cookie } });
}

// A page module rather than a resource route, so that a failure (the database down) is shown
// as the app's error page, not as bare JSON. It never renders: the loader and action redirect.
export default function SignOut() {
  return null;
}
