import { Form, Link } from "react-router";
import type { Route } from "./+types/distortion";
import { Check, useHydrated } from "~/components/calc/controls";
import { MeasuredHow, ReadingGrid } from "~/components/calc/DistortionInputs";
import { DistortionMethod } from "~/components/calc/methods";
import { DistortionResultView } from "~/components/calc/DistortionResult";
import { ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { runDistortionForm, type DistortionOutcome } from "~/lib/calc-ui/distortion-form";
import { deriveDistortion, worstOutOfRound } from "~/lib/calc-ui/distortion-view";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { calcPageAction, distortionPageLoader } from "~/lib/calc-ui/page.server";
import { formatQ, unitOr } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Bore distortion · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  return distortionPageLoader(request);
}

export async function action({ request }: Route.ActionArgs) {
  return calcPageAction(request, runDistortionForm);
}

export default function DistortionPage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<DistortionOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    // Results open in the readings' units (metric readings in an inch account show in mm and µm).
    initial: loaderData.initial,
    run: runDistortionForm,
    derive: deriveDistortion,
  });
  const radial = values.mode === "radial";
  const compare = values["compare.on"] === "on";
  const r = outcome.result;

  return (
    <>
      <PageHeader
        title="Bore distortion"
        kicker="Calculators"
        actions={
          <Link to="/calculators" className="btn">
            All calculators
          </Link>
        }
      >
        How far a bore is from round and straight: out-of-round and its lobes at each depth, taper along the bore, and the change between
        two states (torque plate on and free, or before and after).
      </PageHeader>
      {loaderData.boreSource && (
        <p className="card mb-4 p-3 text-sm" data-testid="bore-source">
          {loaderData.prefill ? "Readings of" : "No bore readings with a depth and an angle for"} cylinder {loaderData.boreSource.cylinder}{" "}
          from <Link to={`/recordings/${loaderData.boreSource.recordingId}`}>{loaderData.boreSource.title}</Link>
          {loaderData.prefill ? ", laid out by depth and angle." : "; the example readings are shown instead."}
        </p>
      )}
      <Form method="post" noValidate onSubmit={(ev) => hydrated && ev.preventDefault()} className="grid gap-6">
        <div className="grid items-start gap-5 lg:grid-cols-[minmax(0,4fr)_minmax(0,8fr)]">
          <MeasuredHow values={values} set={set} errors={outcome.errors} radial={radial} />
          <div className="grid gap-5">
            <ReadingGrid
              prefix="m"
              labelName="label.main"
              legend="Measured state"
              outcome={outcome}
              values={values}
              set={set}
              radial={radial}
            />
            <div className="grid gap-3">
              <Check name="compare.on" label="Compare with a second state" values={values} set={set} />
              {(compare || !hydrated) && (
                <ReadingGrid
                  prefix="c"
                  labelName="label.compare"
                  legend="Compared state"
                  outcome={outcome}
                  values={values}
                  set={set}
                  radial={radial}
                />
              )}
            </div>
            {outcome.errors.grid && (
              <p className="field-error" role="alert">
                {outcome.errors.grid}
              </p>
            )}
            {!hydrated && (
              <button type="submit" className="btn btn-primary justify-self-start">
                Calculate
              </button>
            )}
            {hydrated && r && r.levels.length > 0 && (
              <ResultPeek
                items={[
                  ["Worst out-of-round", formatQ(worstOutOfRound(r.levels), "mm", unitOr(values["out.small"], "um"))],
                  ["Taper", formatQ(r.taper_mm, "mm", unitOr(values["out.small"], "um"))],
                ]}
              />
            )}
          </div>
        </div>
        <DistortionResultView outcome={outcome} values={values} set={set} />
      </Form>
      <DistortionMethod />
    </>
  );
}
