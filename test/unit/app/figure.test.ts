import { describe, expect, test } from "vitest";
import { buildCaptionLines, buildStandaloneSvg, escapeXml, figureFileName, wrapLine } from "@/app/_lib/figure";

/**
 * A small well-formedness check for the markup the helper writes: every tag closes in order, attribute values are
 * quoted, and no bare "<" or "&" is left in text (XML 1.0 §2.4, §3.1) [P].
 */
function checkWellFormed(xml: string): void {
  const body = xml.replace(/^<\?xml[^>]*\?>\s*/, "");
  const stack: string[] = [];
  const token = /<(\/?)([A-Za-z][\w:.-]*)((?:\s+[\w:.-]+\s*=\s*(?:"[^"<]*"|'[^'<]*'))*)\s*(\/?)>|([^<]+)|(<)/g;
  let m: RegExpExecArray | null;
  while ((m = token.exec(body)) !== null) {
    if (m[6]) throw new Error(`a bare "<" at ${m.index}: ${body.slice(m.index, m.index + 40)}`);
    if (m[5] !== undefined) {
      const bareAmp = /&(?!(?:amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);)/.exec(m[5]);
      if (bareAmp) throw new Error(`a bare "&" in text "${m[5]}"`);
      continue;
    }
    const [, closing, name, , selfClosing] = m;
    if (closing) {
      const open = stack.pop();
      if (open !== name) throw new Error(`</${name}> closes <${open}>`);
    } else if (!selfClosing) stack.push(name ?? "");
  }
  if (stack.length > 0) throw new Error(`unclosed: ${stack.join(", ")}`);
}

const CHART = `<svg class="recharts-surface" width="800" height="560" viewBox="0 0 800 560" style="width:100%"><g><text x="10" y="20" style="fill:#333">Altitude (km)</text></g></svg>`;

describe("figure caption", () => {
  test("lines in order: shown, scope, n, then date, version and licence", () => {
    const lines = buildCaptionLines({
      shown: "Temperature against altitude",
      scope: "Flight: Test flight A",
      count: "n = 120 ascent levels",
      madeOn: "2026-12-02",
      version: "0.1.0",
      licence: { id: "CC-BY-4.0", title: "Creative Commons Attribution 4.0" },
    });
    expect(lines).toEqual([
      "Temperature against altitude",
      "Flight: Test flight A",
      "n = 120 ascent levels",
      "Made 2026-12-02 with Lapsebank 0.1.0. Licence: Creative Commons Attribution 4.0 (CC-BY-4.0).",
    ]);
  });

  test("no count and no licence leave their parts out", () => {
    const lines = buildCaptionLines({ shown: "Box plot", scope: "Query: default", count: null, madeOn: "2026-01-31", version: "1.0.0", licence: null });
    expect(lines).toEqual(["Box plot", "Query: default", "Made 2026-01-31 with Lapsebank 1.0.0."]);
  });

  test("escaping: markup characters and control characters", () => {
    // XML 1.0 §2.4 predefined entities [P]; U+0001 is not an XML 1.0 character (§2.2) [P]
    expect(escapeXml(`a < b & c > "d" 'e'\u0001`)).toBe("a &lt; b &amp; c &gt; &quot;d&quot; &apos;e&apos;");
  });

  test("wrapping at spaces keeps every word", () => {
    const line = "one two three four five six seven";
    const pieces = wrapLine(line, 10);
    expect(pieces).toEqual(["one two", "three four", "five six", "seven"]);
    expect(pieces.join(" ")).toBe(line);
    expect(wrapLine("averyveryverylongword x", 5)).toEqual(["averyveryverylongword", "x"]);
  });
});

describe("standalone SVG", () => {
  test("outer size covers chart and caption; the chart's own size is replaced", () => {
    const { svg, widthPx, heightPx } = buildStandaloneSvg({ chartSvg: CHART, widthPx: 1000.4, heightPx: 560, captionLines: ["Line one", "Line two"], fontSizePx: 10 });
    expect(widthPx).toBe(1000);
    // [D] caption = 12 px margin + 2 lines × round(10 × 1.4) = 14 px + 12 px margin = 52 px
    expect(heightPx).toBe(560 + 52);
    expect(svg).toContain(`<svg xmlns="http://www.w3.org/2000/svg" width="1000" height="612" viewBox="0 0 1000 612">`);
    expect(svg).toContain(`<svg x="0" y="0" width="1000" height="560" viewBox="0 0 1000 560" class="recharts-surface" style="width:100%">`);
    expect(svg).not.toContain(`width="800"`);
    expect(svg).toContain("Altitude (km)</text>");
    checkWellFormed(svg);
  });

  test("the caption is real <text>, escaped, below the chart", () => {
    const hostile = `Flight: <b>"Tom & Jerry's" </svg><script>`;
    const { svg } = buildStandaloneSvg({ chartSvg: CHART, widthPx: 1000, heightPx: 560, captionLines: [hostile], fontSizePx: 10 });
    expect(svg).toContain(`<text x="12" y="582">Flight: &lt;b&gt;&quot;Tom &amp; Jerry&apos;s&quot; &lt;/svg&gt;&lt;script&gt;</text>`);
    expect(svg).not.toContain("<script>");
    // [D] first baseline: 560 + 12 + 14 − round(14 × 0.3) = 582
    checkWellFormed(svg);
  });

  test("no caption lines: no caption block and no extra height", () => {
    const { svg, heightPx } = buildStandaloneSvg({ chartSvg: CHART, widthPx: 640, heightPx: 420, captionLines: [] });
    expect(heightPx).toBe(420);
    expect(svg).not.toContain("figure-caption");
    checkWellFormed(svg);
  });

  test("a long caption wraps to the figure width", () => {
    const long = Array.from({ length: 60 }, (_, i) => `word${i}`).join(" ");
    const { svg } = buildStandaloneSvg({ chartSvg: CHART, widthPx: 400, heightPx: 300, captionLines: [long], fontSizePx: 10 });
    const texts = [...svg.matchAll(/<text x="12" y="\d+">([^<]*)<\/text>/g)].map((m) => m[1] ?? "");
    expect(texts.length).toBeGreaterThan(1);
    // [D] (400 − 24) / (10 × 0.55) = 68.4 → at most 68 characters a line
    for (const text of texts) expect(text.length).toBeLessThanOrEqual(68);
    expect(texts.join(" ")).toBe(long);
  });

  test("the legend overlay goes above the caption, inside the document", () => {
    const { svg } = buildStandaloneSvg({ chartSvg: CHART, widthPx: 800, heightPx: 560, overlaySvg: `<text x="5" y="5">Ascent</text>`, captionLines: ["c"] });
    expect(svg.indexOf("figure-overlay")).toBeLessThan(svg.indexOf("figure-caption"));
    checkWellFormed(svg);
  });

  test("markup that is not an <svg> is refused", () => {
    expect(() => buildStandaloneSvg({ chartSvg: "<div></div>", widthPx: 1, heightPx: 1, captionLines: [] })).toThrow(/<svg>/);
  });

  test("the checker itself rejects broken markup", () => {
    expect(() => checkWellFormed("<svg><text>a & b</text></svg>")).toThrow(/bare "&"/);
    expect(() => checkWellFormed("<svg><g></svg>")).toThrow(/closes/);
  });
});

describe("figure file names", () => {
  test("lower case, hyphens, extension", () => {
    expect(figureFileName("Flight Ä/7: Temperature profile", "svg")).toBe("flight-a-7-temperature-profile.svg");
    expect(figureFileName("???", "png")).toBe("figure.png");
  });
});
