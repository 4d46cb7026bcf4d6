import { Form, Link } from "react-router";
import type { Route } from "./+types/clearance";
import { ClearanceInputs } from "~/components/calc/ClearanceInputs";
import { ClearanceResultView } from "~/components/calc/ClearanceResult";
import { useHydrated } from "~/components/calc/controls";
import { ClearanceMethod } from "~/components/calc/methods";
import { ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { clearanceDefaults, runClearanceForm, type ClearanceOutcome } from "~/lib/calc-ui/clearance-form";
import { deriveClearance, isOutOfSpec, peekNote } from "~/lib/calc-ui/clearance-view";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { calcPageAction, calcPageLoader } from "~/lib/calc-ui/page.server";
import { formatQ, unitOr } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Clearances · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  return calcPageLoader(request, clearanceDefaults, runClearanceForm);
}

export async function action({ request }: Route.ActionArgs) {
  return calcPageAction(request, runClearanceForm);
}

export default function ClearancePage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<ClearanceOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    initial: loaderData.initial,
    run: runClearanceForm,
    derive: deriveClearance,
  });
  const r = outcome.result;
  const su = unitOr(values["out.small"], "mm");

  return (
    <>
      <PageHeader
        title="Clearances"
        kicker="Calculators"
        actions={
          <Link to="/calculators" className="btn">
            All calculators
          </Link>
        }
      >
        Piston-to-wall cold and hot, bearing oil clearance, and ring end gap, each checked against its spec.
      </PageHeader>
      <Form
        method="post"
        noValidate
        onSubmit={(ev) => hydrated && ev.preventDefault()}
        className="grid items-start gap-6 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]"
      >
        <div className="grid gap-5">
          <ClearanceInputs kind={outcome.kind} values={values} set={set} errors={outcome.errors} hydrated={hydrated} />
          {!hydrated && (
            <button type="submit" className="btn btn-primary justify-self-start">
              Calculate
            </button>
          )}
          {hydrated && r && (
            <ResultPeek
              bad={isOutOfSpec(r) || r.hotCaution !== undefined}
              note={peekNote(outcome)}
              items={[
                ["Clearance", formatQ(r.clearance_mm, "mm", su, 1)],
                ...(r.hotClearance_mm !== undefined ? [["Hot", formatQ(r.hotClearance_mm, "mm", su, 1)] as [string, string]] : []),
              ]}
            />
          )}
        </div>
        <ClearanceResultView outcome={outcome} values={values} set={set} />
      </Form>
      <ClearanceMethod />
    </>
  );
}
