/**
 * Figures for papers: the caption lines stamped under a downloaded chart and the standalone SVG document that
 * holds the chart and the caption. Pure string work (no DOM), so the browser component and the tests share it.
 */

export const SVG_NS = "http://www.w3.org/2000/svg";

/** Scale of the PNG against the on-screen chart: 3× a 1000 px wide chart is 3000 px, about 300 dpi at 10 in. */
export const PNG_SCALE = 3;

export interface CaptionInput {
  /** What the chart shows, e.g. "Temperature against altitude". */
  shown: string;
  /** The flight title, or the filters of the query, in words. */
  scope: string;
  /** How many flights (or levels) the chart rests on, with its noun, e.g. "n = 12 flights"; null leaves the line out. */
  count: string | null;
  /** The day the figure was made, YYYY-MM-DD. */
  madeOn: string;
  /** The program version (package.json). */
  version: string;
  /** The licence as the export panel names it: title and SPDX identifier. */
  licence: { id: string; title: string } | null;
}

/** The caption's lines, in order: what is shown, scope, n, then date, version and licence on one line. */
export function buildCaptionLines(input: CaptionInput): string[] {
  const lines = [input.shown.trim(), input.scope.trim()];
  if (input.count !== null && input.count.trim() !== "") lines.push(input.count.trim());
  const licence = input.licence ? ` Licence: ${input.licence.title} (${input.licence.id}).` : "";
  lines.push(`Made ${input.madeOn} with Lapsebank ${input.version}.${licence}`);
  return lines.filter((line) => line !== "");
}

/** Escapes text for an XML text node or a double-quoted attribute. */
export function escapeXml(text: string): string {
  return text
    // Characters XML 1.0 does not allow at all (C0 controls other than tab, newline, carriage return).
    .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, "")
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&apos;");
}

/** Breaks a line into pieces of at most `maxChars` characters at spaces (a longer word stays whole). */
export function wrapLine(line: string, maxChars: number): string[] {
  const words = line.split(/\s+/).filter((w) => w !== "");
  const out: string[] = [];
  let current = "";
  for (const word of words) {
    if (current === "") current = word;
    else if (current.length + 1 + word.length <= maxChars) current += ` ${word}`;
    else {
      out.push(current);
      current = word;
    }
  }
  if (current !== "") out.push(current);
  return out;
}

export interface StandaloneSvgOptions {
  /** The serialised chart <svg> (its own width, height and viewBox are replaced). */
  chartSvg: string;
  widthPx: number;
  heightPx: number;
  /** Extra SVG markup drawn over the chart in its coordinates (e.g. the legend, which the chart draws as HTML). */
  overlaySvg?: string;
  captionLines: string[];
  fontSizePx?: number;
  fontFamily?: string;
  textColour?: string;
  background?: string;
}

export interface StandaloneSvg {
  svg: string;
  widthPx: number;
  heightPx: number;
}

const ROOT_SVG_TAG = /^\s*(?:<\?xml[^>]*\?>\s*)?<svg\b([^>]*?)(\/?)>/;

/** The chart's root attributes without the ones the figure sets itself. */
function chartRootAttributes(attributes: string): string {
  return attributes
    .replace(/\s(?:width|height|viewBox|x|y|xmlns)\s*=\s*(?:"[^"]*"|'[^']*')/g, "")
    .trim();
}

/**
 * One SVG document: a background, the chart at (0, 0) in its own nested <svg>, the overlay, and the caption
 * as real <text> lines below the chart. Width, height and viewBox cover chart plus caption.
 */
export function buildStandaloneSvg(options: StandaloneSvgOptions): StandaloneSvg {
  const match = ROOT_SVG_TAG.exec(options.chartSvg);
  if (!match) throw new Error("the chart markup does not start with an <svg> element");
  const widthPx = Math.max(1, Math.round(options.widthPx));
  const chartHeightPx = Math.max(1, Math.round(options.heightPx));
  const fontSizePx = options.fontSizePx ?? 13;
  const fontFamily = options.fontFamily ?? "system-ui, sans-serif";
  const textColour = options.textColour ?? "#1a1a1a";
  const background = options.background ?? "#ffffff";
  const lineHeightPx = Math.round(fontSizePx * 1.4);
  const marginPx = 12;
  // About 0.55 em per character in a proportional sans-serif face.
  const maxChars = Math.max(20, Math.floor((widthPx - 2 * marginPx) / (fontSizePx * 0.55)));
  const lines = options.captionLines.flatMap((line) => wrapLine(line, maxChars));
  const captionHeightPx = lines.length === 0 ? 0 : marginPx + lines.length * lineHeightPx + marginPx;
  const heightPx = chartHeightPx + captionHeightPx;

  const rest = chartRootAttributes(match[1] ?? "");
  const selfClosing = match[2] === "/";
  const chartOpen = `<svg x="0" y="0" width="${widthPx}" height="${chartHeightPx}" viewBox="0 0 ${widthPx} ${chartHeightPx}"${rest ? ` ${rest}` : ""}${selfClosing ? "/" : ""}>`;
  const chart = chartOpen + options.chartSvg.slice(match[0].length);

  const captionText = lines
    .map((line, i) => `<text x="${marginPx}" y="${chartHeightPx + marginPx + (i + 1) * lineHeightPx - Math.round(lineHeightPx * 0.3)}">${escapeXml(line)}</text>`)
    .join("");
  const caption = lines.length === 0
    ? ""
    : `<g class="figure-caption" font-family="${escapeXml(fontFamily)}" font-size="${fontSizePx}" fill="${escapeXml(textColour)}">${captionText}</g>`;

  const svg = `<?xml version="1.0" encoding="UTF-8"?>\n`
    + `<svg xmlns="${SVG_NS}" width="${widthPx}" height="${heightPx}" viewBox="0 0 ${widthPx} ${heightPx}">`
    + `<rect x="0" y="0" width="${widthPx}" height="${heightPx}" fill="${escapeXml(background)}"/>`
    + chart
    + (options.overlaySvg ? `<g class="figure-overlay">${options.overlaySvg}</g>` : "")
    + caption
    + `</svg>\n`;
  return { svg, widthPx, heightPx };
}

/** A file name from a figure title: lower case, letters, digits and hyphens. */
export function figureFileName(title: string, extension: "svg" | "png"): string {
  const stem = title
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 80);
  return `${stem || "figure"}.${extension}`;
}
