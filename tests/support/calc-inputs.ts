/**
 * One piston-to-wall input with thermal growth (the demo's 88 mm grey-iron bore and forged
 * 2618 piston, measured at 20 °C, running at 95 °C and 100 °C), shared by the math module's
 * unit tests and the API's integration tests; `thermal` replaces parts of its thermal block.
 */
export function hotPistonToWall(thermal: Record<string, unknown> = {}) {
  return {
    kind: "piston-to-wall" as const,
    bore: { value: 88.0, unit: "mm" },
    piston: { value: 87.93, unit: "mm" },
    thermal: {
      ambient: { value: 20, unit: "degC" },
      boreTemperature: { value: 95, unit: "degC" },
      pistonTemperature: { value: 100, unit: "degC" },
      boreMaterial: "grey-cast-iron",
      pistonMaterial: "forged-2618",
      ...thermal,
    },
  };
}
