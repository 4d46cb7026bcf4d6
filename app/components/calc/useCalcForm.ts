import { useEffect, useMemo, useState } from "react";
import type { FormValues } from "~/lib/calc-ui/outcome";
import type { SetValue } from "./controls";

/**
 * The state of a calculator page: the typed values (from the server's answer when the form
 * was posted without JavaScript, else the page's first values), the outcome computed in the
 * browser as one types (the server's own while the values are the posted ones or the first
 * ones: see initialForm), and a setter that lets a page derive related fields (`derive`
 * mutates the next values).
 */
export function useCalcForm<O>(opts: {
  actionData: { values: FormValues; outcome: unknown } | undefined;
  /** The first values with the server's outcome (initialForm in the loader). */
  initial: { values: FormValues; outcome: unknown };
  run: (values: FormValues) => O;
  derive?: (next: FormValues, name: string, value: string, previous: FormValues) => void;
}): { values: FormValues; outcome: O; set: SetValue } {
  const { actionData, initial, run, derive } = opts;
  const [values, setValues] = useState<FormValues>(() => actionData?.values ?? initial.values);
  useEffect(() => {
    if (actionData) setValues(actionData.values);
  }, [actionData]);
  // biome-ignore lint/correctness/useExhaustiveDependencies: the outcome follows what was typed; run and the first values are the page's own and do not change
  const outcome = useMemo(
    () =>
      actionData && values === actionData.values
        ? (actionData.outcome as O)
        : values === initial.values
          ? (initial.outcome as O)
          : run(values),
    [values, actionData],
  );
  const set: SetValue = (name, value) =>
    setValues((v) => {
      const next = { ...v, [name]: value };
      derive?.(next, name, value, v);
      return next;
    });
  return { values, outcome, set };
}
