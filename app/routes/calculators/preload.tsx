import { Form, Link } from "react-router";
import type { Route } from "./+types/preload";
import { useHydrated } from "~/components/calc/controls";
import { PreloadMethod } from "~/components/calc/methods";
import { PreloadInputs } from "~/components/calc/PreloadInputs";
import { PreloadResultView } from "~/components/calc/PreloadResult";
import { ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { can } from "~/lib/permissions";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { calcPageAction, calcPageLoader } from "~/lib/calc-ui/page.server";
import { preloadDefaults, runPreloadForm, type PreloadOutcome } from "~/lib/calc-ui/preload-form";
import { YIELD_LIMIT_PERCENT, derivePreload, overYieldLimit } from "~/lib/calc-ui/preload-view";
import { formatNumber, formatQ, unitOr } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Preload · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  return calcPageLoader(request, preloadDefaults, runPreloadForm, (user) => ({ canSaveReadings: can(user.role, "reading:create") }));
}

/** Without JavaScript the form posts here: computed with the same module, typed values kept. */
export async function action({ request }: Route.ActionArgs) {
  return calcPageAction(request, runPreloadForm);
}

export default function PreloadPage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<PreloadOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    initial: loaderData.initial,
    run: runPreloadForm,
    derive: derivePreload,
  });
  const r = outcome.result;

  return (
    <>
      <PageHeader
        title="Preload"
        kicker="Calculators"
        actions={
          <Link to="/calculators" className="btn">
            All calculators
          </Link>
        }
      >
        Clamp load from tightening torque, or the torque for a wanted clamp load, with the stress in the thread and how close it runs to
        yield.
      </PageHeader>
      <Form
        method="post"
        noValidate
        onSubmit={(ev) => hydrated && ev.preventDefault()}
        className="grid items-start gap-6 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]"
      >
        <div className="grid gap-5">
          <PreloadInputs values={values} set={set} errors={outcome.errors} hydrated={hydrated} />
          {!hydrated && (
            <button type="submit" className="btn btn-primary justify-self-start">
              Calculate
            </button>
          )}
          {hydrated && r && (
            <ResultPeek
              bad={overYieldLimit(r)}
              note={overYieldLimit(r) ? `past ${YIELD_LIMIT_PERCENT} % of yield` : undefined}
              items={[
                ["Clamp load", formatQ(r.preload_N, "N", unitOr(values["out.force"], "kN"))],
                ["Torque", formatQ(r.torque_Nm, "N.m", unitOr(values["out.torque"], "N.m"))],
                ...(r.percentOfYield !== undefined ? [["Of yield", `${formatNumber(r.percentOfYield, 1)} %`] as [string, string]] : []),
              ]}
            />
          )}
        </div>

        <PreloadResultView outcome={outcome} values={values} set={set} canSaveReadings={hydrated && loaderData.canSaveReadings} />
      </Form>
      <PreloadMethod />
    </>
  );
}
