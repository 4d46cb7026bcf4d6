// The paths of app/routes.ts, flattened (layouts and prefixes resolved), for tests that go
// over every route so that a new route is covered without anyone adding it.
import routes from "~/routes";

export type ConfiguredRoute = { path: string; file: string };

export function configuredRoutes(rs: typeof routes = routes, parent = ""): ConfiguredRoute[] {
  const out: ConfiguredRoute[] = [];
  for (const r of rs) {
    const p = r.path != null ? `${parent.replace(/\/$/, "")}/${r.path}` : r.index ? parent || "/" : parent;
    if (r.index || r.path != null) out.push({ path: p === "" ? "/" : p, file: r.file });
    if (r.children) out.push(...configuredRoutes(r.children as typeof routes, r.path != null ? p : parent));
  }
  return out;
}
