/**
 * The server side of a calculator page. Every page computes in the browser as one types; the
 * loader sends the first values with the server's outcome (see initialForm), and the action
 * computes a form posted without JavaScript with the same function, keeping what was typed.
 */
import { data } from "react-router";
import { assertCan, requirePermission, type SessionUser } from "~/lib/auth.server";
import { formValues } from "~/lib/domain-error.server";
import { readForm } from "~/lib/edge.server";
import { boreSourceFor, distortionValuesFor } from "~/lib/recordings/bore-source.server";
import { distortionDefaults, resultUnitsOfReadings, runDistortionForm } from "./distortion-form";
import { initialForm, type FormValues } from "./outcome";
import type { UnitSystem } from "./units";

type Run<O> = (values: FormValues) => O;

/** The page's first values in the person's units, with the server's outcome of them; `extra` adds what else the page needs of the person. */
export async function calcPageLoader<O, X extends object = object>(
  request: Request,
  defaults: (system: UnitSystem) => FormValues,
  run: Run<O>,
  extra?: (user: SessionUser) => X,
) {
  const user = await requirePermission(request, "calc:use");
  return { unitSystem: user.unitSystem, initial: initialForm(defaults(user.unitSystem), run), ...(extra?.(user) as X) };
}

/**
 * The Bore distortion page's first values: a recording's bore readings when the address names
 * one (?recording=&cylinder=, which needs shop:read too), else the demo; results in the
 * readings' units.
 */
export async function distortionPageLoader(request: Request) {
  const user = await requirePermission(request, "calc:use");
  const initialOf = (prefill: FormValues | null) =>
    initialForm(resultUnitsOfReadings(prefill ?? distortionDefaults(user.unitSystem)), runDistortionForm);
  if (!new URL(request.url).searchParams.has("recording"))
    return { unitSystem: user.unitSystem, boreSource: null, prefill: null, initial: initialOf(null) };
  assertCan(request, user, "shop:read");
  const boreSource = await boreSourceFor(request);
  const prefill = boreSource && distortionValuesFor(boreSource, distortionDefaults(user.unitSystem));
  return { unitSystem: user.unitSystem, boreSource, prefill, initial: initialOf(prefill) };
}

/** The form posted without JavaScript: 200 with a result, 400 with the field errors, the typed values kept. */
export async function calcPageAction<O extends { result?: unknown }>(request: Request, run: Run<O>) {
  await requirePermission(request, "calc:use");
  const values = formValues(await readForm(request));
  const outcome = run(values);
  return data({ values, outcome }, { status: outcome.result ? 200 : 400 });
}
