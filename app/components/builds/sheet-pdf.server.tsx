import { createRequire } from "node:module";
import { Document, Font, Image, Page, StyleSheet, Text, View, renderToBuffer } from "@react-pdf/renderer";
import type { BuildPage } from "~/lib/builds/page.server";
import type { SheetPhoto } from "~/lib/runs/photos.server";
import { calcSummary, sheetFacts, type SheetPaper, sheetSignOff } from "~/lib/builds/sheet";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { fmtDay } from "~/components/test-records/parts";
import { limitsText, typedReadingText } from "~/components/test-records/units";
import { READING_VERDICT_LABELS, recordVerdictText } from "~/lib/test-records/labels";
import { withEmptyPlaces } from "~/lib/test-records/verdict";
import { positionText } from "~/lib/recordings/positions";

// The build sheet as a PDF (@react-pdf/renderer), in the app's own fonts: Lora for headings and
// words, Source Sans 3 for the tables, as on screen. Figures are tabular where the font has them.

const fontFile = (pkg: string, file: string) => createRequire(import.meta.url).resolve(`@fontsource/${pkg}/files/${file}`);
let fontsRegistered = false;
function registerFonts() {
  if (fontsRegistered) return;
  Font.register({
    family: "Lora",
    fonts: [
      { src: fontFile("lora", "lora-latin-400-normal.woff"), fontWeight: 400 },
      { src: fontFile("lora", "lora-latin-600-normal.woff"), fontWeight: 600 },
      { src: fontFile("lora", "lora-latin-400-italic.woff"), fontWeight: 400, fontStyle: "italic" },
    ],
  });
  Font.register({
    family: "Source Sans 3",
    fonts: [
      { src: fontFile("source-sans-3", "source-sans-3-latin-400-normal.woff"), fontWeight: 400 },
      { src: fontFile("source-sans-3", "source-sans-3-latin-600-normal.woff"), fontWeight: 600 },
    ],
  });
  // Long words in the tables wrap where they must rather than by a hyphenation dictionary.
  Font.registerHyphenationCallback((word) => [word]);
  fontsRegistered = true;
}

/** The limits in words the fonts' Latin files can draw (they have no ≤ or ≥). */
const pdfLimits = (spec: Parameters<typeof limitsText>[0]) => limitsText(spec).replace(/^≤ /, "max ").replace(/^≥ /, "min ");

const GRAPHITE = "#2b2925";
const SOFT = "#6b655b";
const RULE = "#d9d1c3";
const BRASS = "#8a6a2c";
const RED = "#a32020";

const s = StyleSheet.create({
  page: { fontFamily: "Source Sans 3", fontSize: 9, color: GRAPHITE, paddingTop: 36, paddingBottom: 48, paddingHorizontal: 40 },
  kicker: { fontSize: 8, color: BRASS, letterSpacing: 1.2, textTransform: "uppercase", fontWeight: 600 },
  title: { fontFamily: "Lora", fontSize: 20, fontWeight: 600, marginTop: 2 },
  facts: { flexDirection: "row", flexWrap: "wrap", marginTop: 8, borderBottomWidth: 1.5, borderBottomColor: GRAPHITE, paddingBottom: 8 },
  fact: { width: "25%", marginBottom: 4, paddingRight: 6 },
  factLabel: { fontSize: 7.5, color: SOFT },
  h2: { fontFamily: "Lora", fontSize: 12.5, fontWeight: 600, marginTop: 14, marginBottom: 4 },
  recordHead: { flexDirection: "row", justifyContent: "space-between", marginTop: 8 },
  recordTitle: { fontFamily: "Lora", fontSize: 10.5, fontWeight: 600 },
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
  caution: { fontFamily: "Lora", fontStyle: "italic", fontSize: 8, color: SOFT, marginTop: 4 },
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
          <View key={v.record.id} wrap>
            <View style={s.recordHead} minPresenceAhead={40}>
              <Text style={s.recordTitle}>{v.record.title}</Text>
              <Text style={v.record.verdict === "out" ? s.out : {}}>
                {recordVerdictText(
                  v.evaluation.verdict ?? v.record.verdict,
                  v.evaluation.notMeasured.length,
                  v.evaluation.missingPlaces.length,
                )}
              </Text>
            </View>
            <Text style={s.meta}>
              {v.procedure.title}, revision {v.revision.number} · tested {fmtDay(v.record.testedOn)} · signed off by{" "}
              {v.filedBy ?? "a former member of staff"} on {fmtDay(v.record.createdAt)}
              {v.amendments.length ? ` · amended ${v.amendments.length}×` : ""}
            </Text>
            <View style={s.headRow} fixed={false}>
              <Text style={[s.th, s.spec]}>Spec</Text>
              <Text style={[s.th, s.where]}>Where</Text>
              <Text style={[s.th, s.value]}>Reading</Text>
              <Text style={[s.th, s.limits]}>Limits</Text>
              <Text style={[s.th, s.verdict]}>Verdict</Text>
            </View>
            {v.specs.map((spec) => {
              const rs = v.readings.filter((r) => r.specId === spec.id).sort((a, b) => a.position - b.position);
              if (!rs.length)
                return (
                  <View key={spec.id} style={s.row} wrap={false}>
                    <Text style={s.spec}>{spec.label}</Text>
                    <Text style={s.where}>—</Text>
                    <Text style={[s.value, { color: BRASS }]}>not measured</Text>
                    <Text style={s.limits}>{pdfLimits(spec)}</Text>
                    <Text style={s.verdict}>—</Text>
                  </View>
                );
              const empty = v.evaluation.missingPlaces.filter((p) => p.specId === spec.id);
              return withEmptyPlaces(rs, empty).map((item, i) => {
                if ("place" in item)
                  return (
                    <View key={`${spec.id}-${item.place.field}${item.place.n}`} style={s.row} wrap={false}>
                      <Text style={s.spec}>{i === 0 ? spec.label : ""}</Text>
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
                    <Text style={s.spec}>{i === 0 ? spec.label : ""}</Text>
                    <Text style={s.where}>{positionText(r, ", ") || "—"}</Text>
                    <Text style={[s.value, bad ? s.outValue : {}]}>{typedReadingText(r)}</Text>
                    <Text style={s.limits}>{i === 0 ? limitsText(spec) : ""}</Text>
                    <Text style={[s.verdict, bad ? s.out : {}]}>{READING_VERDICT_LABELS[r.verdict]}</Text>
                  </View>
                );
              });
            })}
          </View>
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
