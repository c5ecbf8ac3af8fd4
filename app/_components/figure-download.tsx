"use client";

import { useId, useState, type RefObject } from "react";
import { LICENCES } from "@/lib/export/request";
import { PNG_SCALE, SVG_NS, buildCaptionLines, buildStandaloneSvg, escapeXml, figureFileName, type StandaloneSvg } from "@/app/_lib/figure";

/** Presentation properties copied from the computed style, so CSS rules and CSS variables become plain values. */
const STYLE_PROPERTIES = [
  "fill", "fill-opacity", "stroke", "stroke-width", "stroke-dasharray", "stroke-opacity", "stroke-linecap", "stroke-linejoin",
  "opacity", "visibility", "display",
] as const;
const TEXT_PROPERTIES = ["font-family", "font-size", "font-weight", "font-style", "text-anchor", "dominant-baseline"] as const;

export interface FigureDownloadProps {
  /** The element that holds the rendered chart (its drawing surface, not a legend icon, is the figure). */
  target: RefObject<HTMLElement | null>;
  /** Title for the file name, e.g. the flight title. */
  title: string;
  /** What the chart shows, in words. */
  shown: string;
  /** The flight title or the query's filters, in words. */
  scope: string;
  /** "n = …" with its noun; null when it does not apply. */
  count: string | null;
  /** Lapsebank version (package.json). */
  version: string;
}

function inlineStyles(source: Element, clone: Element): void {
  const computed = window.getComputedStyle(source);
  const isText = source.tagName === "text" || source.tagName === "tspan";
  const declarations: string[] = [];
  for (const property of [...STYLE_PROPERTIES, ...(isText ? TEXT_PROPERTIES : [])]) {
    const value = computed.getPropertyValue(property);
    if (value !== "") declarations.push(`${property}:${value}`);
  }
  const own = clone.getAttribute("style");
  clone.setAttribute("style", `${declarations.join(";")}${own ? `;${own}` : ""}`);
  const sourceChildren = source.children;
  const cloneChildren = clone.children;
  for (let i = 0; i < sourceChildren.length && i < cloneChildren.length; i++) {
    const s = sourceChildren[i];
    const c = cloneChildren[i];
    if (s && c) inlineStyles(s, c);
  }
}

/** The chart's legend is HTML beside the <svg>; redraw each item (its icon and its text) as SVG in chart coordinates. */
function legendOverlay(container: HTMLElement, chartBox: DOMRect, serializer: XMLSerializer): string {
  const parts: string[] = [];
  for (const item of Array.from(container.querySelectorAll(".recharts-legend-item"))) {
    const icon = item.querySelector("svg");
    if (icon) {
      const box = icon.getBoundingClientRect();
      const clone = icon.cloneNode(true) as SVGSVGElement;
      inlineStyles(icon, clone);
      clone.setAttribute("x", String(Math.round(box.left - chartBox.left)));
      clone.setAttribute("y", String(Math.round(box.top - chartBox.top)));
      clone.setAttribute("width", String(Math.round(box.width)));
      clone.setAttribute("height", String(Math.round(box.height)));
      parts.push(serializer.serializeToString(clone));
    }
    const label = item.querySelector(".recharts-legend-item-text") ?? item;
    const text = label.textContent?.trim() ?? "";
    if (text === "") continue;
    const box = label.getBoundingClientRect();
    const style = window.getComputedStyle(label);
    parts.push(
      `<text x="${Math.round(box.left - chartBox.left)}" y="${Math.round(box.top - chartBox.top + box.height * 0.78)}" `
      + `font-family="${escapeXml(style.fontFamily)}" font-size="${escapeXml(style.fontSize)}" fill="${escapeXml(style.color)}">${escapeXml(text)}</text>`,
    );
  }
  return parts.join("");
}

/** The chart's drawing surface: the largest <svg class="recharts-surface"> outside the legend (each legend icon is one too). */
function chartSurface(container: HTMLElement): SVGSVGElement | null {
  let best: SVGSVGElement | null = null;
  let bestArea = 0;
  for (const candidate of Array.from(container.querySelectorAll<SVGSVGElement>("svg.recharts-surface"))) {
    if (candidate.closest(".recharts-legend-wrapper")) continue;
    const box = candidate.getBoundingClientRect();
    if (box.width * box.height > bestArea) {
      best = candidate;
      bestArea = box.width * box.height;
    }
  }
  return best;
}

function serialiseFigure(container: HTMLElement, captionLines: string[]): StandaloneSvg {
  const svg = chartSurface(container);
  if (!svg) throw new Error("the chart has not been drawn yet");
  const box = svg.getBoundingClientRect();
  const clone = svg.cloneNode(true) as SVGSVGElement;
  inlineStyles(svg, clone);
  clone.setAttribute("xmlns", SVG_NS);
  const serializer = new XMLSerializer();
  const bodyStyle = window.getComputedStyle(container);
  return buildStandaloneSvg({
    chartSvg: serializer.serializeToString(clone),
    widthPx: box.width,
    heightPx: box.height,
    overlaySvg: legendOverlay(container, box, serializer),
    captionLines,
    fontFamily: bodyStyle.fontFamily,
  });
}

function saveBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement("a");
  link.href = url;
  link.download = fileName;
  document.body.append(link);
  link.click();
  link.remove();
  window.setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

async function renderPng(figure: StandaloneSvg): Promise<Blob> {
  const url = URL.createObjectURL(new Blob([figure.svg], { type: "image/svg+xml" }));
  try {
    const image = new Image();
    image.decoding = "async";
    await new Promise<void>((resolve, reject) => {
      image.onload = () => resolve();
      image.onerror = () => reject(new Error("the browser could not draw the SVG"));
      image.src = url;
    });
    const canvas = document.createElement("canvas");
    canvas.width = Math.round(figure.widthPx * PNG_SCALE);
    canvas.height = Math.round(figure.heightPx * PNG_SCALE);
    const context = canvas.getContext("2d");
    if (!context) throw new Error("no 2D canvas in this browser");
    context.drawImage(image, 0, 0, canvas.width, canvas.height);
    return await new Promise<Blob>((resolve, reject) => {
      canvas.toBlob((blob) => (blob ? resolve(blob) : reject(new Error("the canvas gave no PNG"))), "image/png");
    });
  } finally {
    URL.revokeObjectURL(url);
  }
}

function today(): string {
  return new Date().toISOString().slice(0, 10);
}

/** "Download figure": SVG (text stays text) or PNG at 3×, with an optional caption block stamped in below the chart. */
export function FigureDownload({ target, title, shown, scope, count, version }: FigureDownloadProps) {
  const id = useId();
  const [withCaption, setWithCaption] = useState(true);
  const [licenceId, setLicenceId] = useState<string>("CC-BY-4.0");
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  function figure(): StandaloneSvg | null {
    const container = target.current;
    if (!container) return null;
    const licence = LICENCES.find((l) => l.id === licenceId) ?? null;
    const lines = withCaption ? buildCaptionLines({ shown, scope, count, madeOn: today(), version, licence }) : [];
    return serialiseFigure(container, lines);
  }

  async function download(kind: "svg" | "png"): Promise<void> {
    setProblem(null);
    setBusy(true);
    try {
      const built = figure();
      if (!built) throw new Error("the chart is not on the page");
      const blob = kind === "svg" ? new Blob([built.svg], { type: "image/svg+xml;charset=utf-8" }) : await renderPng(built);
      saveBlob(blob, figureFileName(title, kind));
    } catch (error) {
      setProblem(error instanceof Error ? error.message : String(error));
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="figure-download" role="group" aria-labelledby={`${id}-label`}>
      <span id={`${id}-label`} className="small">Download figure</span>{" "}
      <label className="small">
        <input type="checkbox" checked={withCaption} onChange={(e) => setWithCaption(e.target.checked)} /> with caption
      </label>{" "}
      <label className="small">
        Licence{" "}
        <select value={licenceId} onChange={(e) => setLicenceId(e.target.value)} disabled={!withCaption}>
          {LICENCES.map((l) => <option key={l.id} value={l.id}>{l.title} ({l.id})</option>)}
        </select>
      </label>{" "}
      <button type="button" className="button button-secondary" disabled={busy} onClick={() => void download("svg")} aria-label={`Download ${shown} as SVG`}>SVG</button>{" "}
      <button type="button" className="button button-secondary" disabled={busy} onClick={() => void download("png")} aria-label={`Download ${shown} as PNG`}>PNG</button>
      {problem && <p className="notice notice-warn small" role="alert">Could not make the figure: {problem}</p>}
    </div>
  );
}
