import { Link } from "react-router";
import type { Route } from "./+types/index";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { CALC_CAUTION, CALC_KINDS, calcLabel, calcPath, type CalcKind } from "~/lib/calc-kinds";

export const meta: Route.MetaFunction = () => [{ title: "Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "calc:use");
  return { unitSystem: user.unitSystem };
}

const ABOUT: Record<CalcKind, { what: string; uses: string }> = {
  preload: {
    what: "Clamp load from torque, or torque for a clamp load, by nut factor or friction coefficients. Stress against the bolt's yield, stretch over the grip, and the effective K from your own bench readings.",
    uses: "Head studs, main studs, rod bolts",
  },
  distortion: {
    what: "Out-of-round, lobes and taper from bore gauge readings at several depths, with a second state to compare (torque plate on against free).",
    uses: "Torque-plate honing, liner checks",
  },
  clearance: {
    what: "Piston-to-wall cold and hot with thermal growth, bearing oil clearance, and ring end gap, each checked against its spec.",
    uses: "Short-block assembly, QC",
  },
};

const CALCULATORS = CALC_KINDS.map((kind) => ({ to: calcPath(kind), name: calcLabel(kind), ...ABOUT[kind] }));

export default function Calculators({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Calculators" kicker="Bench math">
        The same tested math as the procedure pages' calculator blocks and the API. Numbers open in{" "}
        {loaderData.unitSystem === "inch" ? "inch units" : "metric units"}; change it on <Link to="/account">your account</Link>.
      </PageHeader>
      <ul className="grid gap-4 md:grid-cols-3">
        {CALCULATORS.map((c) => (
          <li key={c.to} className="card flex flex-col gap-3">
            <h2 className="text-xl">
              <Link to={c.to} className="text-graphite no-underline hover:underline">
                {c.name}
              </Link>
            </h2>
            <p className="prose-proc flex-1 text-[0.95rem] text-graphite">{c.what}</p>
            <p className="text-xs font-semibold uppercase tracking-[0.12em] text-brass">{c.uses}</p>
            <Link to={c.to} className="btn justify-self-start self-start">
              Open {c.name}
            </Link>
          </li>
        ))}
      </ul>
      <p className="mt-6 max-w-3xl text-sm text-graphite-soft">{CALC_CAUTION}</p>
    </>
  );
}
