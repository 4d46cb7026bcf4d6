// The calculators' JSON API (POST /api/calc/{preload|distortion|clearance}, docs/calculations.md)
// and the calculator pages' actions without JavaScript. Expected numbers come from the
// contract's formulas worked out here, not from the module.
import { beforeAll, describe, expect, it } from "vitest";
import { BASE_URL, createUser, http, type TestUser } from "../support/app";
import { hotPistonToWall } from "../support/calc-inputs";

let user: TestUser;
beforeAll(async () => {
  user = await createUser("apprentice");
});

const post = (kind: string, json: unknown, cookie = user.cookie) => http(`/api/calc/${kind}`, { json, cookie });

// ISO 724 / ISO 898-1: d2 = d − 0.649519·P, d3 = d − 1.226869·P, As = π/4·((d2 + d3)/2)².
function isoStressArea(d: number, p: number): number {
  const d2 = d - 0.649519 * p;
  const d3 = d - 1.226869 * p;
  return (Math.PI / 4) * ((d2 + d3) / 2) ** 2;
}

describe("POST /api/calc/preload", () => {
  it("answers the result with SI keys: T = K·F·d for M12x1.5 at 110 N·m, K 0.15", async () => {
    const res = await post("preload", {
      thread: "M12x1.5",
      torque: { value: 110, unit: "N.m" },
      method: { kind: "nut-factor", k: 0.15 },
      material: { propertyClass: "12.9" },
      grip: { length: { value: 100, unit: "mm" }, modulus: { value: 205, unit: "GPa" } },
    });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/application\/json/);
    const body = await res.json();
    const F = 110 / (0.15 * 0.012); // N
    const As = isoStressArea(12, 1.5); // ≈ 88.1 mm² (ISO 898-1 table)
    expect(As).toBeCloseTo(88.1, 1);
    expect(body.preload_N).toBeCloseTo(F, 6);
    expect(body.torque_Nm).toBeCloseTo(110, 9);
    expect(body.thread.stressArea_mm2).toBeCloseTo(As, 6);
    expect(body.stress_MPa).toBeCloseTo(F / As, 6);
    // ISO 898-1 class 12.9: minimum yield 1100 MPa.
    expect(body.percentOfYield).toBeCloseTo((F / As / 1100) * 100, 6);
    // δ = F·L/(As·E) with L = 100 mm, E = 205 000 MPa.
    expect(body.elongation_mm).toBeCloseTo((F * 100) / (As * 205000), 9);
    expect(Array.isArray(body.warnings)).toBe(true);
  });

  it("works the friction model backwards: preload → torque with its three terms", async () => {
    const res = await post("preload", {
      thread: "M10x1.25",
      direction: "preload-to-torque",
      preload: { value: 30, unit: "kN" },
      method: { kind: "friction", muThread: 0.12, muHead: 0.1, headDiameter: { value: 15, unit: "mm" } },
    });
    expect(res.status).toBe(200);
    const body = await res.json();
    const d2 = 10 - 0.649519 * 1.25; // mm
    const pitch = (30000 * 1.25e-3) / (2 * Math.PI);
    const thread = (30000 * 0.12 * d2 * 1e-3) / (2 * Math.cos(Math.PI / 6));
    const head = (30000 * 0.1 * 15e-3) / 2;
    expect(body.torqueSplit.pitch_Nm).toBeCloseTo(pitch, 6);
    expect(body.torqueSplit.threadFriction_Nm).toBeCloseTo(thread, 6);
    expect(body.torqueSplit.headFriction_Nm).toBeCloseTo(head, 6);
    expect(body.torque_Nm).toBeCloseTo(pitch + thread + head, 6);
    expect(body.percentOfYield).toBeUndefined();
  });

  it("422 with dotted paths for invalid input", async () => {
    const res = await post("preload", { thread: "M12x1.5", torque: { value: -5, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.error).toBe("invalid input");
    expect(body.issues.map((i: { path: string }) => i.path)).toContain("torque.value");
    for (const i of body.issues) expect(typeof i.message).toBe("string");
    // Like every refusal of the API (DomainError), the first issue's message is the reason.
    expect(body.reason).toBe(body.issues[0].message);

    const res2 = await post("preload", { thread: "M99x7", torque: { value: 50, unit: "lbf" }, method: { kind: "nut-factor", k: 0.15 } });
    expect(res2.status).toBe(422);
    const paths = (await res2.json()).issues.map((i: { path: string }) => i.path);
    expect(paths).toContain("thread");
    expect(paths).toContain("torque.unit");
  });

  // Names every plain JavaScript object inherits (ECMAScript, Object.prototype): a table
  // looked up as a plain object used to find them, and the API answered 500.
  it("422, not 500, for a property class named after Object.prototype's members", async () => {
    for (const propertyClass of ["constructor", "__proto__", "toString"]) {
      const res = await post("preload", {
        thread: "M12x1.5",
        torque: { value: 110, unit: "N.m" },
        method: { kind: "nut-factor", k: 0.15 },
        material: { propertyClass },
      });
      expect(res.status, propertyClass).toBe(422);
      expect((await res.json()).issues.map((i: { path: string }) => i.path)).toEqual(["material.propertyClass"]);
    }
  });

  it("400 for malformed JSON", async () => {
    const res = await http("/api/calc/preload", {
      method: "POST",
      cookie: user.cookie,
      body: '{"thread": "M12x1.5",',
      headers: { "content-type": "application/json" },
    });
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/JSON/);
  });

  it("401 JSON without a session", async () => {
    const res = await http("/api/calc/preload", { json: { thread: "M12x1.5" } });
    expect(res.status).toBe(401);
    expect(res.headers.get("content-type")).toMatch(/application\/json/);
    await res.body?.cancel();
  });

  it("413 over 256 kB, by Content-Length and when streamed without one", async () => {
    const big = JSON.stringify({ thread: "M12x1.5", pad: "x".repeat(300 * 1024) });
    const res = await http("/api/calc/preload", {
      method: "POST",
      cookie: user.cookie,
      body: big,
      headers: { "content-type": "application/json" },
    });
    expect(res.status).toBe(413);
    await res.body?.cancel();

    // Chunked: no Content-Length header, so the bytes must be counted while reading.
    const chunk = new TextEncoder().encode(" ".repeat(64 * 1024));
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(c) {
        if (sent++ < 6) c.enqueue(chunk);
        else {
          c.enqueue(new TextEncoder().encode("{}"));
          c.close();
        }
      },
    });
    const res2 = await fetch(new URL("/api/calc/preload", BASE_URL), {
      method: "POST",
      headers: { cookie: user.cookie, origin: BASE_URL, "content-type": "application/json" },
      body: stream,
      duplex: "half",
    } as RequestInit);
    expect(res2.status).toBe(413);
    await res2.body?.cancel();

    // Just under the limit is read (and here rejected only as invalid input).
    const under = JSON.stringify({ pad: "x".repeat(200 * 1024) });
    const res3 = await http("/api/calc/preload", {
      method: "POST",
      cookie: user.cookie,
      body: under,
      headers: { "content-type": "application/json" },
    });
    expect(res3.status).toBe(422);
    await res3.body?.cancel();
  });
});

describe("POST /api/calc/distortion", () => {
  // A two-point gauge on an oval (order 2) bore: D(θ) = 88 + 2·A·cos(2θ), A = 0.005 mm.
  const A = 0.005;
  const diameterAt = (deg: number) => 88 + 2 * A * Math.cos((2 * deg * Math.PI) / 180);
  const level = (depth: number, offset: number) =>
    [0, 45, 90, 135].map((a) => ({
      depth: { value: depth, unit: "mm" },
      angleDeg: a,
      diameter: { value: diameterAt(a) + offset, unit: "mm" },
    }));

  it("levels, out-of-round, order 2 and taper", async () => {
    const res = await post("distortion", { readings: [...level(10, 0), ...level(60, 0.004)], reference: { value: 88, unit: "mm" } });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.levels).toHaveLength(2);
    const [top, bottom] = body.levels;
    expect(top.depth_mm).toBeCloseTo(10, 9);
    expect(top.meanDiameter_mm).toBeCloseTo(88, 9);
    expect(top.outOfRound_mm).toBeCloseTo(4 * A, 9);
    const o2 = top.orders.find((o: { order: number }) => o.order === 2);
    expect(o2.radialAmplitude_mm).toBeCloseTo(A, 9);
    expect(o2.phaseDeg).toBeCloseTo(0, 6);
    expect(top.orders.every((o: { order: number }) => o.order % 2 === 0)).toBe(true);
    expect(bottom.meanDiameter_mm).toBeCloseTo(88.004, 9);
    expect(body.taper_mm).toBeCloseTo(0.004, 9);
    expect(body.taperTopToBottom_mm).toBeCloseTo(-0.004, 9);
  });

  it("differences against a compared state", async () => {
    const res = await post("distortion", { readings: level(10, 0.002), compareTo: { readings: level(10, 0) } });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.compared.levels).toHaveLength(1);
    expect(body.difference.levels[0].meanDiameter_mm).toBeCloseTo(0.002, 9);
    expect(body.difference.levels[0].outOfRound_mm).toBeCloseTo(0, 9);
  });

  it("422 paths into the readings", async () => {
    const res = await post("distortion", {
      readings: [{ depth: { value: 10, unit: "mm" }, angleDeg: 0, diameter: { value: -88, unit: "mm" } }],
    });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.issues.map((i: { path: string }) => i.path)).toContain("readings.0.diameter.value");
  });
});

describe("POST /api/calc/clearance", () => {
  it("piston-to-wall, cold and hot (ΔD = D·α·ΔT), within its spec", async () => {
    // 88.0 mm bore, 87.93 mm piston, from 20 °C, with the coefficients typed
    const thermal = {
      boreTemperature: { value: 100, unit: "degC" },
      pistonTemperature: { value: 200, unit: "degC" },
      boreMaterial: { alphaPerK: 11e-6 },
      pistonMaterial: { alphaPerK: 22e-6 },
    };
    const res = await post("clearance", {
      ...hotPistonToWall(thermal),
      spec: { min: { value: 0.06, unit: "mm" }, max: { value: 0.08, unit: "mm" } },
    });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.clearance_mm).toBeCloseTo(0.07, 9);
    expect(body.hotClearance_mm).toBeCloseTo(88 * (1 + 11e-6 * 80) - 87.93 * (1 + 22e-6 * 180), 9);
    expect(body.verdict).toBe("within");
    expect(body.perInchOfDiameter).toBeCloseTo(0.07 / 88, 9);
  });

  it("bearing with two shells, in inch units, below its spec", async () => {
    const res = await post("clearance", {
      kind: "bearing",
      journal: { value: 2.0, unit: "in" },
      housingBore: { value: 2.1504, unit: "in" },
      shellThickness: { value: 75, unit: "thou" },
      spec: { min: { value: 1.8, unit: "thou" } },
    });
    expect(res.status).toBe(200);
    const body = await res.json();
    // 2.1504 − 2 × 0.075 − 2.0 = 0.0004 in = 0.01016 mm
    expect(body.clearance_mm).toBeCloseTo(0.0004 * 25.4, 9);
    expect(body.verdict).toBe("below");
    expect(body.warnings.length).toBeGreaterThan(0);
  });

  it("ring gap from a factor", async () => {
    const res = await post("clearance", { kind: "ring-gap", bore: { value: 88, unit: "mm" }, gapPerBore: 0.0055 });
    expect(res.status).toBe(200);
    expect((await res.json()).recommendedGap_mm).toBeCloseTo(88 * 0.0055, 9);
  });

  it("422, not 500, for a piston or bore material named after Object.prototype's members", async () => {
    for (const name of ["constructor", "__proto__"]) {
      for (const which of ["pistonMaterial", "boreMaterial"]) {
        const res = await post("clearance", hotPistonToWall({ [which]: name }));
        expect(res.status, `${which} ${name}`).toBe(422);
        expect((await res.json()).issues.map((i: { path: string }) => i.path)).toContain(`thermal.${which}`);
      }
    }
  });

  it("422 for a temperature below absolute zero (0 K = −459.67 °F, NIST SP 811 B.8)", async () => {
    const res = await post("clearance", hotPistonToWall({ pistonTemperature: { value: -500, unit: "degF" } }));
    expect(res.status).toBe(422);
    expect((await res.json()).issues.map((i: { path: string }) => i.path)).toContain("thermal.pistonTemperature.value");
  });

  it("a 2618 piston at 2,000 K answers with a warning that the alloy would be melting (ASM Handbook Vol. 2: from about 549 °C)", async () => {
    const res = await post("clearance", hotPistonToWall({ pistonTemperature: { value: 2000, unit: "K" } }));
    expect(res.status).toBe(200);
    expect((await res.json()).warnings.join(" ")).toMatch(/piston temperature .* begins to melt/);
  });

  it("422 for an unknown kind, with the path", async () => {
    const res = await post("clearance", { kind: "valve-lash" });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.error).toBe("invalid input");
    expect(body.issues[0].path).toBe("kind");
  });
});

describe("calculator pages without JavaScript", () => {
  const html = async (res: Response) => {
    expect(res.headers.get("content-type")).toMatch(/text\/html/);
    return res.text();
  };

  it("Preload: the form posts to the action and the page shows the result, keeping what was typed", async () => {
    const res = await http("/calculators/preload", {
      cookie: user.cookie,
      headers: { accept: "text/html" },
      form: {
        thread: "M12x1.5",
        direction: "torque-to-preload",
        "torque.value": "110",
        "torque.unit": "N.m",
        "method.kind": "nut-factor",
        nutCondition: "custom",
        "method.k": "0.15",
        materialChoice: "12.9",
        "out.force": "kN",
        "out.torque": "N.m",
        "out.stress": "MPa",
      },
    });
    expect(res.status).toBe(200);
    const page = await html(res);
    const kN = (110 / (0.15 * 0.012) / 1000).toFixed(2); // "61.11"
    expect(page).toMatch(new RegExp(`data-testid="result-preload"[^>]*>${kN.replace(".", "\\.")}<`));
    expect(page).toContain('value="0.15"');
    expect(page).toContain("Estimates for planning and checking.");
    expect(page).toContain("<svg");
  });

  it("Preload: a field error comes back by field with the typed value", async () => {
    const res = await http("/calculators/preload", {
      cookie: user.cookie,
      headers: { accept: "text/html" },
      form: {
        thread: "M12x1.5",
        direction: "torque-to-preload",
        "torque.value": "eleven",
        "torque.unit": "N.m",
        "method.kind": "nut-factor",
        nutCondition: "oiled",
      },
    });
    expect(res.status).toBe(400);
    const page = await html(res);
    expect(page).toContain("That is not a number.");
    expect(page).toContain('value="eleven"');
  });

  it("Clearances: piston-to-wall computed by the action, in thou", async () => {
    const res = await http("/calculators/clearance", {
      cookie: user.cookie,
      headers: { accept: "text/html" },
      form: {
        kind: "piston-to-wall",
        "bore.value": "88.000",
        "bore.unit": "mm",
        "piston.value": "87.930",
        "piston.unit": "mm",
        "out.small": "thou",
      },
    });
    expect(res.status).toBe(200);
    const page = await html(res);
    const thou = ((0.07 / 25.4) * 1000).toFixed(3); // 2.756
    expect(page).toMatch(new RegExp(`data-testid="result-clearance"[^>]*>${thou.replace(".", "\\.")}<`));
  });

  it('Clearances: a material named "constructor" is a field error (400), not a 500', async () => {
    const res = await http("/calculators/clearance", {
      cookie: user.cookie,
      headers: { accept: "text/html" },
      form: {
        kind: "piston-to-wall",
        "bore.value": "88.000",
        "bore.unit": "mm",
        "piston.value": "87.930",
        "piston.unit": "mm",
        "thermal.on": "on",
        "thermal.ambient.value": "20",
        "thermal.ambient.unit": "degC",
        "thermal.boreTemperature.value": "95",
        "thermal.boreTemperature.unit": "degC",
        "thermal.pistonTemperature.value": "100",
        "thermal.pistonTemperature.unit": "degC",
        "thermal.boreMaterial": "grey-cast-iron",
        "thermal.pistonMaterial": "constructor",
        "out.small": "thou",
      },
    });
    expect(res.status).toBe(400);
    expect(await html(res)).toContain("Unknown material");
  });

  it("Bore distortion: the grid posts and the out-of-round comes back", async () => {
    const form: Record<string, string> = {
      mode: "diametral",
      depths: "10",
      "depth.unit": "mm",
      angles: "0, 45, 90, 135",
      "reading.unit": "mm",
      "out.small": "um",
      "out.length": "mm",
    };
    ["88.010", "88.000", "87.990", "88.000"].forEach((v, j) => (form[`m.0.${j}`] = v));
    const res = await http("/calculators/distortion", { cookie: user.cookie, headers: { accept: "text/html" }, form });
    expect(res.status).toBe(200);
    const page = await html(res);
    expect(page).toMatch(/data-testid="result-oor"[^>]*>20\.0</); // 88.010 − 87.990 mm = 20 µm
    expect(page).toContain("two-point gauge");
  });
});
