import { createRequire } from "node:module";
import { Document, Font, Image, Page, StyleSheet, Text, View, renderToBuffer } from "@react-pdf/renderer";
import type { BuildPage } from "~/lib/builds/page.server";
import type { SheetPhoto } from "~/lib/runs/photos.server";
import { calcSummary, sheetFacts, type SheetPaper, sheetSignOff } from "~/lib/builds/sheet";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { fmtDay } from "~/components/test-records/parts";
import { limitsText, typedReadingText } from "~/components/test-records/units";
import { READING_VERDICT_LABELS, recordVerdictText, specVerdictText } from "~/lib/test-records/labels";
import { withEmptyPlaces } from "~/lib/test-records/verdict";
import { positionText } from "~/lib/recordings/positions";

// The build sheet as a PDF (@react-pdf/renderer), in the app's own fonts: Lora for headings and
// words, Source Sans 3 for the tables, as on screen. Figures are tabular where the font has them.
// Every text names a list of embedded families: a character missing from the first is looked up
// in the next, and only one missing from all falls to react-pdf's own Helvetica, which is not
// embedded and draws "≤" as "d". The Latin files lack ≤ and ≥ (Lora's "math" file has them) and
// letters such as ł or ő (the "latin-ext" files).

const fontFile = (pkg: string, file: string) => createRequire(import.meta.url).resolve(`@fontsource/${pkg}/files/${file}`);
const faces = (pkg: string, subset: string, variants: { weight: number; italic?: boolean }[]) =>
  variants.map(({ weight, italic }) => ({
    src: fontFile(pkg, `${pkg}-${subset}-${weight}-${italic ? "italic" : "normal"}.woff`),
    fontWeight: weight,
    ...(italic ? { fontStyle: "italic" as const } : {}),
  }));
const LORA_FACES = [{ weight: 400 }, { weight: 600 }, { weight: 400, italic: true }];
const SANS_FACES = [{ weight: 400 }, { weight: 600 }];
const SERIF = ["Lora", "Lora Ext", "Lora Math"];
const SANS = ["Source Sans 3", "Source Sans 3 Ext", "Lora Math"];

let fontsRegistered = false;
function registerFonts() {
  if (fontsRegistered) return;
  Font.register({ family: "Lora", fonts: faces("lora", "latin", LORA_FACES) });
  Font.register({ family: "Lora Ext", fonts: faces("lora", "latin-ext", LORA_FACES) });
  Font.register({ family: "Lora Math", fonts: faces("lora", "math", LORA_FACES) });
  Font.register({ family: "Source Sans 3", fonts: faces("source-sans-3", "latin", SANS_FACES) });
  Font.register({ family: "Source Sans 3 Ext", fonts: faces("source-sans-3", "latin-ext", SANS_FACES) });
  // Long words in the tables wrap where they must rather than by a hyphenation dictionary.
  Font.registerHyphenationCallback((word) => [word]);
  fontsRegistered = true;
}

/** A record of at most this many table rows is kept whole on one page; a longer one repeats its header row. */
const WHOLE_RECORD_ROWS = 12;
/** Points of a long record's table that must follow its title on the same page: the header row and three rows. */
const TITLE_PRESENCE = 70;

const GRAPHITE = "#2b2925";
const SOFT = "#6b655b";
const RULE = "#d9d1c3";
const BRASS = "#8a6a2c";
const RED = "#a32020";

const s = StyleSheet.create({
  page: { fontFamily: SANS, fontSize: 9, color: GRAPHITE, paddingTop: 36, paddingBottom: 48, paddingHorizontal: 40 },
  kicker: { fontSize: 8, color: BRASS, letterSpacing: 1.2, textTransform: "uppercase", fontWeight: 600 },
  title: { fontFamily: SERIF, fontSize: 20, fontWeight: 600, marginTop: 2 },
  facts: { flexDirection: "row", flexWrap: "wrap", marginTop: 8, borderBottomWidth: 1.5, borderBottomColor: GRAPHITE, paddingBottom: 8 },
  fact: { width: "25%", marginBottom: 4, paddingRight: 6 },
  factLabel: { fontSize: 7.5, color: SOFT },
  h2: { fontFamily: SERIF, fontSize: 12.5, fontWeight: 600, marginTop: 14, marginBottom: 4 },
  recordHead: { flexDirection: "row", justifyContent: "space-between", marginTop: 8 },
  recordTitle: { fontFamily: SERIF, fontSize: 10.5, fontWeight: 600 },
  meta: { fontSize: 8, color: SOFT, marginBottom: 3 },
  row: { flexDirection: "row", borderBottomWidth: 0.5, borderBottomColor: RULE, paddingVertical: 2 },
  headRow: { flexDirection: "row", borderBottomWidth: 0.8, borderBottomColor: GRAPHITE, paddingBottom: 2 },
  th: { fontSize: 7.5, color: SOFT, fontWeight: 600, textTransform: "uppercase" },
  spec: { width: "30%", paddingRight: 4 },
  where: { width: "20%", paddingRight: 4 },
  value: { width: "17%", textAlign: "right", paddingRight: 8 },
  limits: { width: "20%", paddingRight: 4 },
  verdict: { width: "13%" },
  out: { color: RED, fontWeight: 600 },
  // Figures stay in the regular face: the semibold file's digits went missing from the PDF's text and page.
  outValue: { color: RED },
  photos: { flexDirection: "row", flexWrap: "wrap" },
  photo: { width: "33%", paddingRight: 8, marginBottom: 8 },
  picture: { width: "100%", maxHeight: 140, objectFit: "contain", marginBottom: 2 },
  specTag: { fontSize: 7.5, color: SOFT, marginTop: 1 },
  signatures: { flexDirection: "row", marginTop: 28 },
  signature: { width: "50%", paddingRight: 24 },
  signLine: { borderBottomWidth: 0.8, borderBottomColor: GRAPHITE, height: 22, marginBottom: 3 },
  caution: { fontFamily: SERIF, fontStyle: "italic", fontSize: 8, color: SOFT, marginTop: 4 },
  footer: {
    position: "absolute",
    bottom: 22,
    left: 40,
    right: 40,
    flexDirection: "row",
    justifyContent: "space-between",
    fontSize: 7.5,
    color: SOFT,
  },
});

function Fact({ label, value }: { label: string; value: string }) {
  return (
    <View style={s.fact}>
      <Text style={s.factLabel}>{label}</Text>
      <Text>{value}</Text>
    </View>
  );
}

type RecordView = BuildPage["records"][number];

/** Rows a record's table takes: a reading or a place left empty each, a spec with neither one. */
function tableRows(v: RecordView): number {
  return v.specs.reduce((n, spec) => {
    const rs = v.readings.filter((r) => r.specId === spec.id).length;
    return n + (rs ? rs + v.evaluation.missingPlaces.filter((p) => p.specId === spec.id).length : 1);
  }, 0);
}

// react-pdf takes any `fixed` prop, false included, for fixed: the prop is there only when repeated.
function HeadRow({ repeat }: { repeat: boolean }) {
  return (
    <View style={s.headRow} {...(repeat ? { fixed: true } : {})}>
      <Text style={[s.th, s.spec]}>Spec</Text>
      <Text style={[s.th, s.where]}>Where</Text>
      <Text style={[s.th, s.value]}>Reading</Text>
      <Text style={[s.th, s.limits]}>Limits</Text>
      <Text style={[s.th, s.verdict]}>Verdict</Text>
    </View>
  );
}

/** The spec's name and, under it, its verdict in the words the screen uses ("Within spec so far; …"). */
function SpecCell({ label, tag, tone }: { label: string; tag: string | null; tone: "out" | "short" | "plain" }) {
  return (
    <View style={s.spec}>
      <Text>{label}</Text>
      {tag && <Text style={[s.specTag, tone === "out" ? s.out : tone === "short" ? { color: BRASS } : {}]}>{tag}</Text>}
    </View>
  );
}

/**
 * One test record: whole on one page when short; a long one breaks between rows and repeats its
 * header row on the next page. Its title never stands alone at the foot of a page: react-pdf
 * weighs `minPresenceAhead` only against the title's following siblings when it has earlier
 * ones, so the title of a long record stands beside its table, not inside it.
 */
function RecordTable({ v }: { v: RecordView }) {
  const title = (
    <View minPresenceAhead={TITLE_PRESENCE}>
      <View style={s.recordHead}>
        <Text style={s.recordTitle}>{v.record.title}</Text>
        <Text style={v.evaluation.verdict === "out" ? s.out : {}}>
          {recordVerdictText(v.evaluation.verdict ?? v.record.verdict, v.evaluation.notMeasured.length, v.evaluation.missingPlaces.length)}
        </Text>
      </View>
      <Text style={s.meta}>
        {v.procedure.title}, revision {v.revision.number} · tested {fmtDay(v.record.testedOn)} · signed off by{" "}
        {v.filedBy ?? "a former member of staff"} on {fmtDay(v.record.createdAt)}
        {v.amendments.length ? ` · amended ${v.amendments.length}×` : ""}
      </Text>
    </View>
  );
  const rows = v.specs.map((spec) => {
    const rs = v.readings.filter((r) => r.specId === spec.id).sort((a, b) => a.position - b.position);
    const sv = v.evaluation.specs.find((e) => e.specId === spec.id)?.verdict ?? "not-measured";
    if (!rs.length)
      return (
        <View key={spec.id} style={s.row} wrap={false}>
          <SpecCell label={spec.label} tag={null} tone="plain" />
          <Text style={s.where}>—</Text>
          <Text style={[s.value, { color: BRASS }]}>not measured</Text>
          <Text style={s.limits}>{limitsText(spec)}</Text>
          <Text style={s.verdict}>—</Text>
        </View>
      );
    const empty = v.evaluation.missingPlaces.filter((p) => p.specId === spec.id);
    const first = (i: number) => (
      <SpecCell
        label={i === 0 ? spec.label : ""}
        tag={i === 0 ? specVerdictText(sv, empty.length) : null}
        tone={sv === "out" ? "out" : empty.length ? "short" : "plain"}
      />
    );
    return withEmptyPlaces(rs, empty).map((item, i) => {
      if ("place" in item)
        return (
          <View key={`${spec.id}-${item.place.field}${item.place.n}`} style={s.row} wrap={false}>
            {first(i)}
            <Text style={s.where}>{positionText({ [item.place.field]: item.place.n })}</Text>
            <Text style={[s.value, { color: BRASS }]}>not measured</Text>
            <Text style={s.limits}>{i === 0 ? limitsText(spec) : ""}</Text>
            <Text style={s.verdict}>left empty</Text>
          </View>
        );
      const r = item.r;
      const bad = r.verdict === "below" || r.verdict === "above";
      return (
        <View key={r.id} style={s.row} wrap={false}>
          {first(i)}
          <Text style={s.where}>{positionText(r, ", ") || "—"}</Text>
          <Text style={[s.value, bad ? s.outValue : {}]}>{typedReadingText(r)}</Text>
          <Text style={s.limits}>{i === 0 ? limitsText(spec) : ""}</Text>
          <Text style={[s.verdict, bad ? s.out : {}]}>{READING_VERDICT_LABELS[r.verdict]}</Text>
        </View>
      );
    });
  });
  if (tableRows(v) > WHOLE_RECORD_ROWS)
    return (
      <>
        {title}
        <View>
          <HeadRow repeat />
          {rows}
        </View>
      </>
    );
  return (
    <View wrap={false}>
      {title}
      <HeadRow repeat={false} />
      {rows}
    </View>
  );
}

/** A line to sign on, with who signs under it; the date beside the signature. */
function Signature({ duty, name }: { duty: string; name: string | null }) {
  return (
    <View style={s.signature}>
      <View style={s.signLine} />
      <Text>{name ? `${duty} · ${name}` : duty}</Text>
      <Text style={s.meta}>Signature and date</Text>
    </View>
  );
}

function BuildSheetDocument({ page, paper, photos }: { page: BuildPage; paper: SheetPaper; photos: SheetPhoto[] }) {
  const { build, records, calcs } = page;
  const signOff = sheetSignOff(page);
  return (
    <Document title={`Build sheet ${build.number}`} author="Larkspur Engine Works" subject={`${build.engine} ${build.engineSerial}`.trim()}>
      <Page size={paper === "letter" ? "LETTER" : "A4"} style={s.page}>
        <Text style={s.kicker}>Larkspur Engine Works · Build sheet</Text>
        <Text style={s.title}>
          {build.number} · {build.engine || "Engine"}
        </Text>
        <View style={s.facts}>
          {sheetFacts(build).map((f) => (
            <Fact key={f.label} label={f.label} value={f.value} />
          ))}
        </View>

        <Text style={s.h2}>Measured</Text>
        {records.length === 0 && <Text>No test record is filed for this build.</Text>}
        {records.map((v) => (
          <RecordTable key={v.record.id} v={v} />
        ))}

        {calcs.some((c) => c.ok) && (
          <View wrap={false}>
            <Text style={s.h2}>Calculated from these readings</Text>
            {calcs.map((c) => {
              const line = calcSummary(c);
              return line && <Text key={c.label}>{line}</Text>;
            })}
            <Text style={s.caution}>{CALC_CAUTION}</Text>
          </View>
        )}

        {photos.length > 0 && (
          <View>
            <Text style={s.h2}>Photos taken at the bench</Text>
            <View style={s.photos}>
              {photos.map((p) => (
                <View key={p.id} style={s.photo} wrap={false}>
                  {p.data && <Image style={s.picture} src={{ data: p.data, format: p.mime === "image/png" ? "png" : "jpg" }} />}
                  <Text>{p.where ? `${p.specLabel}, ${p.where}` : p.specLabel}</Text>
                  <Text style={s.meta}>
                    {p.takenByName ?? "a former member of staff"}, {fmtDay(p.createdAt)}
                    {p.data ? "" : " (the picture is on the build page)"}
                  </Text>
                </View>
              ))}
            </View>
          </View>
        )}

        <View wrap={false}>
          <Text style={s.h2}>Sign-off</Text>
          {signOff.map((line) => (
            <Text key={line}>{line}</Text>
          ))}
          <View style={s.signatures}>
            <Signature duty="Lead builder" name={build.leadBuilderName} />
            <Signature duty="Received by the customer" name={build.customerName} />
          </View>
          <Text style={s.caution}>
            Limits are those of the procedure revision each test followed. For torque, fastener and machining values the fastener maker's
            and the engine maker's published values take precedence; follow local codes and licensed practice. Re-torque and run-in as the
            engine maker directs.
          </Text>
        </View>

        <View style={s.footer} fixed>
          <Text>
            {build.number} · serial {build.engineSerial || "not recorded"}
          </Text>
          <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
        </View>
      </Page>
    </Document>
  );
}

/** The build sheet as PDF bytes, on A4 or Letter. */
export async function buildSheetPdf(page: BuildPage, paper: SheetPaper = "a4", photos: SheetPhoto[] = []): Promise<Buffer> {
  registerFonts();
  return renderToBuffer(<BuildSheetDocument page={page} paper={paper} photos={photos} />);
}
