// The three calculator pages in the browser: results as the person types, unit switches that
// agree with the contract's factors, the chart (svg) and the caution. Expected numbers are
// worked out here from the formulas (T = K·F·d, out-of-round = max − min, bore − piston).
import { expect, test, type Page } from "@playwright/test";
import { signIn as signInAs } from "../support/browser";

const LBF = 4.4482216152605; // N per lbf (NIST SP 811)
const CAUTION = "Estimates for planning and checking. The fastener maker's and the engine maker's published values take precedence";

async function signIn(page: Page, email: string, path: string) {
  await signInAs(page, email);
  await page.goto(path);
  // Hydrated: the no-JS "Calculate" button is gone.
  await expect(page.getByRole("button", { name: "Calculate" })).toHaveCount(0);
}

const num = async (page: Page, testId: string) => Number((await page.getByTestId(testId).innerText()).replace(/,/g, ""));

test("Preload computes as you type, switches units consistently, marks past 90 % of yield", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/preload");
  await expect(page.getByTestId("calc-caution")).toContainText(CAUTION);
  await expect(page.getByTestId("preload-chart")).toBeVisible();

  await page.getByLabel("Thread condition").selectOption("custom");
  await page.getByLabel("Nut factor K").fill("0.15");
  await page.getByLabel("Tightening torque", { exact: true }).fill("100");
  const F = 100 / (0.15 * 0.012); // N, M12: d = 12 mm
  await expect(page.getByTestId("result-preload")).toHaveText((F / 1000).toFixed(2));

  await page.getByLabel("Show clamp load in").selectOption("lbf");
  await expect.poll(() => num(page, "result-preload")).toBe(Math.round(F / LBF));

  // The same number in ft·lbf is 1.3558… times the torque.
  await page.getByLabel("Tightening torque: unit").selectOption("ft.lbf");
  await expect.poll(() => num(page, "result-preload")).toBe(Math.round((100 * 0.3048 * LBF) / (0.15 * 0.012) / LBF));

  // Class 8.8 (640 MPa) at 200 N·m is far past 90 % of yield: red, with the reason.
  await page.getByLabel("Tightening torque: unit").selectOption("N.m");
  await page.getByLabel("Property class or material").selectOption("8.8");
  await page.getByLabel("Tightening torque", { exact: true }).fill("200");
  await expect(page.getByTestId("yield-alert")).toContainText("past the 90 % limit");
  await expect(page.getByTestId("calc-result")).toHaveAttribute("data-state", "out-of-spec");

  // Bench readings give a fitted K on the chart: points made with K = 0.2 exactly (F = T/(0.2·0.012)).
  await page.getByLabel("Torque and measured clamp load, one pair a line").fill(["60, 25", "90, 37.5", "120, 50"].join("\n"));
  await expect(page.getByTestId("fit-summary")).toContainText("K = 0.200");
});

test("Preload names the thread's diameters as their standards do, and the fit's R² as the uncentred one", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/preload");
  const figures = page.getByTestId("thread-figures");
  // ISO 898-1: d3 = d − 1.226869·P is the minor diameter; M12x1.5 → 10.160 mm.
  await expect(figures).toContainText("Minor diameter d3 = d − 1.226869·P");
  await expect(figures).toContainText((12 - 1.226869 * 1.5).toFixed(3));
  // ASME B1.1: As = 0.7854·(D − 0.9743·P)² averages d2 with D − 1.299038·P, not a minor diameter.
  await page.getByLabel("Thread", { exact: true }).fill("1/2-13 UNC");
  await expect(figures).toContainText("Stress-area diameter D − 1.299038·P");
  await expect(figures).toContainText(((0.5 - 1.299038 / 13) * 25.4).toFixed(3));
  await expect(figures).not.toContainText("Minor diameter");
  await expect(figures).toContainText("basic minor diameter D − 1.082532·P");
  // Points on a line through the origin fit it exactly: R² about zero (uncentred) is 1.
  await page.getByLabel("Torque and measured clamp load, one pair a line").fill(["60, 25", "90, 37.5", "120, 50"].join("\n"));
  await expect(page.getByTestId("fit-summary")).toContainText("R² through the origin (uncentred) 1.000");
});

test("Preload opens in inch units for a person who prefers them", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example", "/calculators/preload");
  await expect(page.getByLabel("Tightening torque: unit")).toHaveValue("ft.lbf");
  await expect(page.getByLabel("Show clamp load in")).toHaveValue("lbf");
  await expect(page.getByTestId("preload-chart")).toBeVisible();
});

test("Bore distortion updates out-of-round as readings are typed and converts µm to thou", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/distortion");
  await expect(page.getByTestId("calc-caution")).toContainText(CAUTION);
  await expect(page.getByTestId("bore-polar")).toHaveCount(3);
  await expect(page.getByTestId("exaggeration").first()).toContainText("deviation ×");
  await expect(page.getByTestId("bore-profile").getByRole("img")).toBeVisible();
  await expect(page.getByText("Why a two-point gauge cannot see order 3.")).toBeVisible();

  // Make the top level of the measured state 88.030 at 0°: out-of-round there = 88.030 − 87.997 = 33 µm.
  await page.getByLabel("Measured state, 12 mm deep, 0°").fill("88.030");
  await expect(page.getByTestId("result-oor")).toHaveText("33.0");
  await page.getByLabel("Show deviations in").selectOption("thou");
  await expect(page.getByTestId("result-oor")).toHaveText((33 / 25.4).toFixed(2));
});

test("Clearances: cold and hot against the spec, out of spec in red, units switch", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/clearance");
  await expect(page.getByTestId("calc-caution")).toContainText(CAUTION);
  await expect(page.getByTestId("clearance-chart").getByRole("img")).toBeVisible();
  await expect(page.getByTestId("result-hot")).toBeVisible();

  await page.getByLabel("Piston at the gauge point", { exact: true }).fill("87.912");
  await expect(page.getByTestId("result-clearance")).toHaveText("0.0880");
  await expect(page.getByTestId("clearance-verdict")).toHaveText("Cold clearance within spec");
  await page.getByLabel("Piston at the gauge point", { exact: true }).fill("87.950");
  await expect(page.getByTestId("clearance-verdict")).toContainText("Cold clearance out of spec");
  await page.getByLabel("Show clearances in").selectOption("thou");
  await expect(page.getByTestId("result-clearance")).toHaveText(((0.05 / 25.4) * 1000).toFixed(3));

  await page.getByText("Ring end gap", { exact: true }).click();
  await expect(page.getByTestId("clearance-chart").getByRole("img")).toBeVisible();
  await expect(page.getByText("Shop guidance (common practice, no standard)")).toBeVisible();
});

test("Clearances: a piston hotter than where its alloy begins to melt is warned about in red", async ({ page }) => {
  await signIn(page, "dana@larkspur.example", "/calculators/clearance");
  await expect(page.getByTestId("result-hot")).toBeVisible();
  // ASM Handbook Vol. 2: forged 2618 begins to melt at about 549 °C; 2,000 K is 1,726.85 °C.
  await page.getByLabel("Piston running", { exact: true }).fill("1726.85");
  const warning = page.getByTestId("calc-warnings").getByText(/piston temperature .* begins to melt/);
  await expect(warning).toBeVisible();
  await expect(warning).toHaveClass(/text-spec-red/);
});

test("Preload: bench points are saved as readings on a recording, paired for its nut-factor chart", async ({ page }) => {
  await signIn(page, "marcus@larkspur.example", "/calculators/preload");
  await page.getByLabel("Unit of the readings' torque").selectOption("N.m");
  await page.getByLabel("Unit of the readings' clamp load").selectOption("kN");
  // Points made with K = 0.2 exactly on M12 (F = T/(0.2·0.012 m)).
  await page.getByLabel("Torque and measured clamp load, one pair a line").fill(["60, 25", "90, 37.5", "120, 50"].join("\n"));
  await expect(page.getByTestId("fit-summary")).toContainText("K = 0.200");
  await page.getByTestId("save-readings-open").click();
  const panel = page.getByTestId("save-readings");
  await panel.getByLabel("Recording").selectOption({ label: "Head stud clamp-load test, M12×1.5, moly lube" });
  const label = `calc point ${Date.now().toString(36)}`;
  await panel.getByLabel("Label (numbered)").fill(label);
  await panel.getByLabel("Stud no. on the fixture (optional)").fill("7");
  await panel.getByRole("button", { name: "Save 6 readings" }).click();
  await expect(page.getByTestId("save-readings-done")).toContainText("Saved 6 readings");
  await page.getByTestId("save-readings-done").getByRole("link").click();
  await expect(page).toHaveURL(/\/recordings\/[0-9a-f-]+$/);
  await expect(page.getByText(`${label} 3`).first()).toBeVisible();
  // The stud is in the readings' position field (issue 14 §2).
  await expect(
    page
      .getByTestId("reading-row")
      .filter({ hasText: `${label} 3` })
      .first()
      .getByTestId("reading-where"),
  ).toContainText("stud 7");
  await expect(page.getByTestId("nut-factor-chart")).toBeVisible();
  // The readings chart's points play from their moment by keyboard too (the demo's first torque is at 0:10.5).
  const point = page.getByRole("button", { name: /^Play from 0:10\.5: / });
  await point.focus();
  await page.keyboard.press("Enter");
  await expect
    .poll(() =>
      page
        .locator("video")
        .first()
        .evaluate((v: HTMLVideoElement) => v.currentTime),
    )
    .toBeCloseTo(10.5, 0);
});

test("Preload: an apprentice is not offered to save readings", async ({ page }) => {
  await signIn(page, "jamie@larkspur.example", "/calculators/preload");
  await page.getByLabel("Torque and measured clamp load, one pair a line").fill(["45, 5900", "63, 8200"].join("\n"));
  await expect(page.getByTestId("fit-summary")).toBeVisible();
  await expect(page.getByTestId("save-readings-open")).toHaveCount(0);
});

test("on a tablet the main figures stay in view at the bottom while one types", async ({ page }) => {
  await page.setViewportSize({ width: 768, height: 1000 });
  await signIn(page, "dana@larkspur.example", "/calculators/preload");
  await page.getByLabel("Thread condition").selectOption("custom");
  await page.getByLabel("Nut factor K").fill("0.15");
  await page.getByLabel("Tightening torque", { exact: true }).fill("100");
  const peek = page.getByTestId("result-peek");
  await expect(peek).toBeVisible();
  await expect(peek).toContainText(`${(100 / (0.15 * 0.012) / 1000).toFixed(2)} kN`); // T = K·F·d, M12
  await page.setViewportSize({ width: 1280, height: 900 });
  await expect(peek).toBeHidden(); // beside the form on a wide screen

  await page.setViewportSize({ width: 768, height: 1000 });
  await page.goto("/calculators/distortion");
  await expect(page.getByTestId("result-peek")).toContainText("Worst out-of-round");
  await expect(page.getByTestId("result-peek")).toContainText(await page.getByTestId("result-oor").first().innerText());
});
