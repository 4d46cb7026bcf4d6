import { useEffect, useMemo, useState } from "react";
import type { FormValues } from "~/lib/calc-ui/outcome";
import type { SetValue } from "./controls";

/**
 * The state of a calculator page: the typed values (from the server's answer when the form
 * was posted without JavaScript, else the defaults), the outcome computed in the browser as
 * one types (the server's own while the values are the posted ones), and a setter that lets a
 * page derive related fields (`derive` mutates the next values).
 */
export function useCalcForm<O>(opts: {
  actionData: { values: FormValues; outcome: unknown } | undefined;
  defaults: () => FormValues;
  run: (values: FormValues) => O;
  derive?: (next: FormValues, name: string, value: string, previous: FormValues) => void;
}): { values: FormValues; outcome: O; set: SetValue } {
  const { actionData, defaults, run, derive } = opts;
  const [values, setValues] = useState<FormValues>(() => actionData?.values ?? defaults());
  useEffect(() => {
    if (actionData) setValues(actionData.values);
  }, [actionData]);
  const outcome = useMemo(
    () => (actionData && values === actionData.values ? (actionData.outcome as O) : run(values)),
    // eslint-disable-next-line react-hooks/exhaustive-deps
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
