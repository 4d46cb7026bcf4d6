// Demo procedures for Larkspur Engine Works (PRODUCT.md's invented shop). Written for the
// scenario; values are typical planning figures and every page defers to the makers' data.
import { eq, sql } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { procedureLinks, procedureMoments, procedureRevisions, procedures, procedureSpecs, procedureWatchers } from "../../app/db/schema";
import { countWords, sanitizeDocument, type JSONNode } from "../../app/lib/procedures/document";
import { extract } from "../../app/lib/procedures/extract";

type Db = NodePgDatabase<Record<string, unknown>>;
type N = JSONNode;

const t = (text: string, marks?: N["marks"]): N => ({ type: "text", text, ...(marks ? { marks } : {}) });
const p = (...c: (string | N)[]): N => ({ type: "paragraph", content: c.map((x) => (typeof x === "string" ? t(x) : x)) });
const h = (text: string, level = 2): N => ({ type: "heading", attrs: { level }, content: [t(text)] });
const steps = (...items: (string | N)[]): N => ({
  type: "orderedList",
  attrs: { start: 1 },
  content: items.map((i) => ({ type: "listItem", content: [typeof i === "string" ? p(i) : i] })),
});
const bullets = (...items: string[]): N => ({ type: "bulletList", content: items.map((i) => ({ type: "listItem", content: [p(i)] })) });
const caution = (...texts: string[]): N => ({ type: "caution", content: texts.map((x) => p(x)) });
const spec = (
  id: string,
  label: string,
  quantity: string,
  unit: string,
  nominal: number | null,
  min: number | null,
  max: number | null,
  note = "",
): N => ({ type: "spec", attrs: { id, label, quantity, unit, nominal, min, max, note } });
const calc = (kind: string, title: string, preset: Record<string, unknown>): N => ({ type: "calculator", attrs: { kind, title, preset } });
const link = (procedureId: string): N => ({ type: "procedureLink", attrs: { procedureId } });
const moment = (recordingId: string, start: number, end: number | null, caption: string): N => ({
  type: "videoMoment",
  attrs: { recordingId, start, end, caption },
});
const MAKERS =
  "The torque and machining values here are the shop's planning figures. The fastener maker's and the engine maker's published values take precedence; follow local codes and licensed practice.";

const ID = {
  studs: "1a000000-0000-4000-8000-000000000001",
  honing: "1a000000-0000-4000-8000-000000000002",
  ptw: "1a000000-0000-4000-8000-000000000003",
  deck: "1a000000-0000-4000-8000-000000000004",
  bearings: "1a000000-0000-4000-8000-000000000005",
  aircooled: "1a000000-0000-4000-8000-000000000006",
  leakdown: "1a000000-0000-4000-8000-000000000007",
};
const DEMO_RECORDING = "5eed0000-0000-4000-8000-00000000c1a9";
/**
 * The head studs' nut factor from revision 2 on: what the demo recording's torque / clamp-load
 * readings fit (scripts/seed/recordings.ts; fitNutFactor gives 0.180 ± 0.003). A test
 * (tests/integration/demo-scenario.test.ts) fits the seeded readings again and holds the preset to it.
 */
export const STUDS_K = 0.18;

function studsDoc(rev: 1 | 2 | 3): N {
  const final = rev === 1 ? 105 : 110;
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Why"),
      p(
        "The head gasket seals only as well as the clamp load is even. On the 2.3 L aluminium block the M12×1.5 studs thread into aluminium, so a stud that bottoms or a thread that is dirty gives a false torque reading and an uneven clamp. We torque studs in passes, with one lubricant, so that the relation between torque and clamp load stays the one we measured on the bench.",
      ),
      h("Tools and parts"),
      bullets(
        "Torque wrench checked within the last 3 months",
        "Thread chaser M12×1.5 and compressed air",
        "Stud lubricant: the shop's moly paste, on threads and under the nut",
        "Torque plate log sheet",
      ),
      h("Steps"),
      steps(
        "Chase every block thread and blow it out; a dry test fit must run in by hand to the bottom, then back off a quarter turn.",
        "Install the studs finger-tight with the short thread in the block. Do not use the stud as a handle.",
        rev === 1
          ? p(
              "Lubricate the nut threads and the washer face. Use the same lube as the bench test: the preload below assumes K = ",
              t("0.15", [{ type: "bold" }]),
              ", from the paste's data sheet (before our own clamp-load test).",
            )
          : p(
              "Lubricate the nut threads and the washer face. Use the same lube as the bench test: the preload below assumes K = ",
              t(STUDS_K.toFixed(2), [{ type: "bold" }]),
              ", the nut factor our clamp-load test fits for the shop's moly paste on these studs (see the video below). Book figures for moly paste are lower; at the same torque they would promise more clamp load than our studs get.",
            ),
        "Pass 1 to 40 N·m in the spiral sequence, centre out.",
        "Pass 2 to 75 N·m in the same sequence.",
        `Final pass to ${final} N·m; mark each nut with a paint pen after its final pass.`,
      ),
      spec("studs-final", "Head stud final torque", "torque", "N.m", final, final - 5, final + 5, "moly on threads and washer face"),
      spec("studs-protrusion", "Stud protrusion above deck", "length", "mm", 52.0, 51.5, 52.5),
      ...(rev === 3
        ? [spec("studs-stretch", "Stud stretch after final pass", "length", "mm", 0.15, 0.12, 0.18, "measured with the stretch gauge")]
        : []),
      calc("preload", "M12×1.5 head studs, moly", {
        thread: "M12x1.5",
        direction: "torque-to-preload",
        torque: { value: final, unit: "N.m" },
        method: { kind: "nut-factor", k: rev === 1 ? 0.15 : STUDS_K },
        material: { propertyClass: "12.9" },
      }),
      moment(DEMO_RECORDING, 18.4, null, "Final pass on stud 4; the load washer reads 51 kN"),
      h("Checks"),
      p("Before the head goes on, the block is honed with the torque plate fitted to this same procedure: ", link(ID.honing), "."),
      ...(rev >= 2
        ? [
            caution(
              "Never re-torque a stud that has been run to yield. If a nut turns past its paint mark at the final torque, stop and tell the senior builder.",
            ),
          ]
        : []),
    ],
  };
}

function honingDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Why"),
      p(
        "Clamping the head pulls the top of an iron-lined aluminium bore out of round. Honing with a torque plate torqued like the head makes the bore round when the engine is assembled, not on the bench.",
      ),
      h("Steps"),
      steps(
        p("Fit the torque plate with the head gasket and torque the studs to ", link(ID.studs), "."),
        "Rough hone to within 0.02 mm of size, then finish with the plateau stones.",
        "Measure each bore at 10, 50 and 90 mm down at 0°, 45°, 90° and 135°, plate still fitted.",
        "Record the readings in the bore log and in the calculator below.",
      ),
      spec("bore-dia", "Bore diameter, plate fitted", "length", "mm", 88.0, 87.995, 88.01),
      spec("bore-oor", "Out-of-round at any depth", "length", "mm", null, null, 0.008),
      // The same three depths the step names, so a run asks for each of them in the grid.
      calc("distortion", "Cylinder 2, plate fitted", {
        mode: "diametral",
        reference: { value: 88.0, unit: "mm" },
        readings: [0, 45, 90, 135].flatMap((a, i) =>
          [10, 50, 90].map((d) => ({
            depth: { value: d, unit: "mm" },
            angleDeg: a,
            diameter: { value: [88.004, 88.007, 88.005, 88.002][i] + (d === 10 ? 0 : -0.001), unit: "mm" },
          })),
        ),
      }),
      caution("Do not hone without the plate fitted on the aluminium blocks: the bore will not be round under the head."),
    ],
  };
}

function ptwDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Why"),
      p(
        "Forged 2618 pistons grow more than cast or 4032 pistons when hot, so they are fitted looser cold. Too tight scuffs the skirt; too loose rocks and rattles.",
      ),
      h("Steps"),
      steps(
        "Measure the piston skirt at the maker's gauge height, 90° to the pin.",
        "Measure the bore 40 mm down across the thrust axis.",
        "Piston-to-wall = bore − skirt. Compare with the spec below.",
      ),
      spec("ptw-2618", "Piston-to-wall, forged 2618 in iron liner", "length", "mm", 0.07, 0.06, 0.08, "turbo street build"),
      calc("clearance", "2618 piston in the 88.0 mm bore", {
        kind: "piston-to-wall",
        bore: { value: 88.0, unit: "mm" },
        piston: { value: 87.93, unit: "mm" },
        spec: { min: { value: 0.06, unit: "mm" }, max: { value: 0.08, unit: "mm" } },
      }),
      p("The bores must be finished with the plate fitted first: ", link(ID.honing), "."),
    ],
  };
}

function deckDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Steps"),
      steps(
        "Check deck flatness with a straightedge and feeler gauge in six directions.",
        "Take the smallest cut that cleans up; record the amount removed on the job card.",
        "Re-check stud protrusion after decking: see the stud procedure.",
      ),
      spec("deck-flat", "Deck flatness over the whole deck", "length", "mm", null, null, 0.05),
      spec("deck-ra", "Surface finish after the cut (Ra, µm)", "length", "um", null, 0.4, 1.6, "MLS gasket"),
      p("Next: ", link(ID.studs), "."),
    ],
  };
}

function bearingsDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Steps"),
      steps(
        "Torque the main caps to the maker's figure without shells and measure the housing bore.",
        "Fit the shells, torque again, and measure the bearing bore at 90° to the parting line.",
        "Measure each journal in two planes; oil clearance = bearing bore − journal.",
      ),
      spec("main-oil", "Main bearing oil clearance", "length", "mm", 0.05, 0.04, 0.065),
      calc("clearance", "Main journal", {
        kind: "bearing",
        journal: { value: 59.98, unit: "mm" },
        bearingBore: { value: 60.03, unit: "mm" },
      }),
    ],
  };
}

function aircooledDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS),
      h("Why"),
      p(
        "The air-cooled flat-fours clamp each barrel with M10×1.25 studs into a magnesium or aluminium case. Over-torque pulls the studs; under-torque lets the barrels fret and the heads leak.",
      ),
      h("Steps"),
      steps(
        "Check that every case stud is tight in the case and its thread clean.",
        "Fit barrels and heads; lubricate the nut threads and washers lightly with oil.",
        "Torque in a cross pattern in two passes: 10 N·m, then the final torque below.",
      ),
      spec("ac-stud", "Cylinder head nut torque (M10×1.25)", "torque", "N.m", 32, 30, 34, "oiled"),
      spec("ac-ptw", "Piston-to-wall, 4032 piston in the 94 mm barrel", "length", "mm", 0.05, 0.04, 0.06),
      calc("preload", "M10×1.25 case studs, oiled", {
        thread: "M10x1.25",
        direction: "torque-to-preload",
        torque: { value: 32, unit: "N.m" },
        method: { kind: "nut-factor", k: 0.18 },
        material: { propertyClass: "8.8" },
      }),
      calc("clearance", "4032 piston in the 94 mm barrel", {
        kind: "piston-to-wall",
        bore: { value: 94.0, unit: "mm" },
        piston: { value: 93.95, unit: "mm" },
      }),
    ],
  };
}

function leakdownDoc(): N {
  return {
    type: "doc",
    content: [
      caution(MAKERS, "Hold the crank before applying air: a piston off top dead centre will turn the engine."),
      h("Steps"),
      steps(
        "Warm the engine, then bring each cylinder to top dead centre on compression.",
        "Apply regulated air and read the leak percentage.",
        "Listen at the intake, exhaust and breather to find where the air goes.",
      ),
      spec("leak-pct", "Leak-down after break-in (as a pressure drop at 7 bar)", "stress", "bar", null, null, 0.7, "about 10 %"),
      p("Results are filed as test records against this revision; a high cylinder is checked against ", link(ID.ptw), "."),
    ],
  };
}

type Rev = {
  number: number;
  state: "draft" | "in_review" | "published" | "superseded";
  doc: N;
  author: string;
  note: string | null;
  daysAgo: number;
  title?: string;
};
type Def = {
  id: string;
  slug: string;
  title: string;
  area: "block" | "heads" | "fasteners" | "rotating-assembly" | "assembly" | "qc";
  summary: string;
  tags: string[];
  revs: Rev[];
};

const DEFS: Def[] = [
  {
    id: ID.studs,
    slug: "head-stud-installation-and-torque-sequence",
    title: "Head stud installation and torque sequence",
    area: "fasteners",
    summary: "M12×1.5 head studs on the 2.3 L block: clean threads, moly, three passes in the spiral sequence.",
    tags: ["head studs", "torque", "moly", "2.3 L"],
    revs: [
      { number: 1, state: "superseded", doc: studsDoc(1), author: "demo-marcus", note: "First write-up from the bench test", daysAgo: 60 },
      {
        number: 2,
        state: "published",
        doc: studsDoc(2),
        author: "demo-marcus",
        note: "Final torque 110 N·m and K 0.18 as the clamp-load test fits it; caution on yielded studs",
        daysAgo: 20,
      },
      { number: 3, state: "in_review", doc: studsDoc(3), author: "demo-marcus", note: "Add the stud stretch check", daysAgo: 2 },
    ],
  },
  {
    id: ID.honing,
    slug: "torque-plate-honing-iron-lined-block",
    title: "Torque-plate honing an iron-lined aluminium block",
    area: "block",
    summary: "Hone the 88.0 mm bores with the torque plate fitted so they are round under the head.",
    tags: ["honing", "torque plate", "bore distortion"],
    revs: [{ number: 1, state: "published", doc: honingDoc(), author: "demo-marcus", note: "First version", daysAgo: 40 }],
  },
  {
    id: ID.ptw,
    slug: "checking-piston-to-wall-on-forged-pistons",
    title: "Checking piston-to-wall on forged pistons",
    area: "rotating-assembly",
    summary: "Measure skirt and bore and check the 2618 clearance band.",
    tags: ["piston to wall", "2618", "clearance"],
    revs: [{ number: 1, state: "published", doc: ptwDoc(), author: "demo-marcus", note: "First version", daysAgo: 35 }],
  },
  {
    id: ID.deck,
    slug: "decking-the-block-for-mls-gaskets",
    title: "Decking the block for MLS gaskets",
    area: "block",
    summary: "Flatness and finish for multi-layer steel head gaskets.",
    tags: ["decking", "gasket"],
    revs: [{ number: 1, state: "published", doc: deckDoc(), author: "demo-priya", note: "First version", daysAgo: 30 }],
  },
  {
    id: ID.bearings,
    slug: "main-bearing-oil-clearance",
    title: "Main bearing oil clearance",
    area: "assembly",
    summary: "Measure housing, bearing bore and journals; check the oil clearance.",
    tags: ["oil clearance", "bearings"],
    revs: [{ number: 1, state: "published", doc: bearingsDoc(), author: "demo-marcus", note: "First version", daysAgo: 25 }],
  },
  {
    id: ID.aircooled,
    slug: "air-cooled-flat-four-barrel-and-head-torque",
    title: "Air-cooled flat-four: barrel and head torque",
    area: "heads",
    summary: "M10×1.25 case studs and 4032 pistons in the 94 mm barrels.",
    tags: ["air-cooled", "torque", "4032"],
    revs: [{ number: 1, state: "published", doc: aircooledDoc(), author: "demo-marcus", note: "First version", daysAgo: 15 }],
  },
  {
    id: ID.leakdown,
    slug: "leak-down-test-after-break-in",
    title: "Leak-down test after break-in",
    area: "qc",
    summary: "Leak-down on every cylinder after the break-in run, filed as a test record.",
    tags: ["leak-down", "qc"],
    revs: [{ number: 1, state: "published", doc: leakdownDoc(), author: "demo-tomas", note: "First version", daysAgo: 10 }],
  },
];

export async function seedProcedures(db: Db): Promise<number> {
  let added = 0;
  const recordingsThere = (await db.execute(sql`select to_regclass('public.recordings') is not null as r`)).rows[0] as { r: boolean };
  for (const d of DEFS) {
    const [exists] = await db.select({ id: procedures.id }).from(procedures).where(eq(procedures.id, d.id));
    if (exists) continue;
    await db.transaction(async (tx) => {
      const published = d.revs.find((r) => r.state === "published");
      const day = (n: number) => new Date(Date.now() - n * 86_400_000);
      await tx.insert(procedures).values({
        id: d.id,
        slug: d.slug,
        title: d.title,
        area: d.area,
        summary: d.summary,
        tags: d.tags,
        createdBy: d.revs[0].author,
        createdAt: day(d.revs[0].daysAgo),
        publishedAt: published ? day(published.daysAgo) : null,
      });
      let publishedId: string | null = null;
      for (const r of d.revs) {
        let doc = r.doc;
        if (!recordingsThere.r) doc = { ...doc, content: doc.content!.filter((n) => n.type !== "videoMoment") };
        const clean = sanitizeDocument(doc);
        if (!clean.ok) throw new Error(`demo procedure ${d.slug} r${r.number} is invalid: ${JSON.stringify(clean.errors)}`);
        const at = day(r.daysAgo);
        const [row] = await tx
          .insert(procedureRevisions)
          .values({
            procedureId: d.id,
            number: r.number,
            state: r.state,
            title: r.title ?? d.title,
            summary: d.summary,
            area: d.area,
            tags: d.tags,
            doc: clean.doc,
            wordCount: countWords(clean.doc),
            authorId: r.author,
            lastSavedBy: r.author,
            changeNote: r.note,
            reviewedBy: r.state === "published" || r.state === "superseded" ? "demo-priya" : null,
            publishedBy: r.state === "published" || r.state === "superseded" ? "demo-priya" : null,
            createdAt: at,
            updatedAt: at,
            submittedAt: r.state === "draft" ? null : at,
            publishedAt: r.state === "published" || r.state === "superseded" ? at : null,
            supersededAt: r.state === "superseded" ? day(d.revs.find((x) => x.state === "published")!.daysAgo) : null,
          })
          .returning({ id: procedureRevisions.id });
        if (r.state === "published") publishedId = row.id;
        const x = extract(clean.doc);
        if (x.specs.length) await tx.insert(procedureSpecs).values(x.specs.map((s) => ({ ...s, revisionId: row.id, procedureId: d.id })));
        if (x.moments.length)
          await tx.insert(procedureMoments).values(x.moments.map((m) => ({ ...m, revisionId: row.id, procedureId: d.id })));
        const targets = x.links.filter((l) => l !== d.id);
        if (targets.length)
          await tx.insert(procedureLinks).values(targets.map((to) => ({ revisionId: row.id, fromProcedureId: d.id, toProcedureId: to })));
      }
      await tx.update(procedures).set({ publishedRevisionId: publishedId }).where(eq(procedures.id, d.id));
    });
    added++;
  }
  if (added) {
    await db
      .insert(procedureWatchers)
      .values([
        { procedureId: ID.studs, userId: "demo-jamie" },
        { procedureId: ID.studs, userId: "demo-tomas" },
      ])
      .onConflictDoNothing();
    // Marks in the demo recordings that point at these procedures.
    const marksThere = (await db.execute(sql`select to_regclass('public.marks') is not null as m`)).rows[0] as { m: boolean };
    if (marksThere.m) {
      await db.execute(
        sql`update marks set procedure_id = ${ID.studs}::uuid where procedure_id is null and (text ilike '%torque%' or text ilike '%moly%' or text ilike '%stud%')`,
      );
      await db.execute(
        sql`update marks set procedure_id = ${ID.honing}::uuid where procedure_id is null and (text ilike '%bore%' or text ilike '%hone%' or text ilike '%plate%')`,
      );
    }
  }
  return added;
}
