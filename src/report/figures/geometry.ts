import type { Results } from "../../analysis/types.js";
import { PORTRAIT_PLOT } from "./palette.js";

/**
 * Plot geometry for the figure builders: clipping to the window, thinning to the pixel grid,
 * headings and label anchors. Drawing choices only; nothing here recomputes analysis.
 */

/** The window mapped onto a plot area of width × height px. */
export interface PlotFrame {
  lo: [number, number];
  hi: [number, number];
  width: number;
  height: number;
}

export interface Polyline {
  x: number[];
  y: number[];
}

/** Kept points sit at least this far apart (px): finer detail is below what a print resolves. */
export const THIN_PX = 0.75;
/** Plotted data keep this many significant digits: 1e-7 of a 400 px axis is far below a pixel. */
export const DATA_DIGITS = 7;

export function roundData(v: number): number {
  return Number(v.toPrecision(DATA_DIGITS)) + 0;
}

/** Screen coordinates in px, y upward from the bottom of the plot. */
export function toPlot(frame: PlotFrame, x: number, y: number): [number, number] {
  return [
    ((x - frame.lo[0]) / (frame.hi[0] - frame.lo[0])) * frame.width,
    ((y - frame.lo[1]) / (frame.hi[1] - frame.lo[1])) * frame.height,
  ];
}

/** Inverse of toPlot. */
export function fromPlot(frame: PlotFrame, u: number, v: number): [number, number] {
  return [
    frame.lo[0] + (u / frame.width) * (frame.hi[0] - frame.lo[0]),
    frame.lo[1] + (v / frame.height) * (frame.hi[1] - frame.lo[1]),
  ];
}

/** Compass heading on screen of the direction (dx, dy) in data units: degrees clockwise from up. */
export function headingOf(frame: PlotFrame, dx: number, dy: number): number {
  const du = (dx / (frame.hi[0] - frame.lo[0])) * frame.width;
  const dv = (dy / (frame.hi[1] - frame.lo[1])) * frame.height;
  const deg = (Math.atan2(du, dv) * 180) / Math.PI;
  return Math.round((((deg % 360) + 360) % 360) * 10) / 10;
}

/** Liang–Barsky: the part of segment p→q inside the window, as parameters [t0, t1], or null. */
function clipSegment(frame: PlotFrame, p: [number, number], q: [number, number]): [number, number] | null {
  let t0 = 0,
    t1 = 1;
  const d = [q[0] - p[0], q[1] - p[1]];
  for (let k = 0; k < 2; k++) {
    for (const [num, den] of [
      [p[k] - frame.lo[k], -d[k]],
      [frame.hi[k] - p[k], d[k]],
    ]) {
      if (den === 0) {
        if (num < 0) return null;
        continue;
      }
      const t = num / den;
      if (den < 0) {
        if (t > t1) return null;
        if (t > t0) t0 = t;
      } else {
        if (t < t0) return null;
        if (t < t1) t1 = t;
      }
    }
  }
  return [t0, t1];
}

/** The runs of a polyline inside the window, cut exactly at its edges; non-finite points break a run. */
export function clipPolyline(frame: PlotFrame, line: Polyline): Polyline[] {
  const out: Polyline[] = [];
  let run: Polyline = { x: [], y: [] };
  const flush = () => {
    if (run.x.length >= 2) out.push(run);
    run = { x: [], y: [] };
  };
  const push = (x: number, y: number) => {
    const n = run.x.length;
    if (n && run.x[n - 1] === x && run.y[n - 1] === y) return;
    run.x.push(x);
    run.y.push(y);
  };
  for (let k = 0; k + 1 < line.x.length; k++) {
    const p: [number, number] = [line.x[k], line.y[k]];
    const q: [number, number] = [line.x[k + 1], line.y[k + 1]];
    if (![...p, ...q].every(Number.isFinite)) {
      flush();
      continue;
    }
    const t = clipSegment(frame, p, q);
    if (!t) {
      flush();
      continue;
    }
    const a: [number, number] = [p[0] + t[0] * (q[0] - p[0]), p[1] + t[0] * (q[1] - p[1])];
    const b: [number, number] = [p[0] + t[1] * (q[0] - p[0]), p[1] + t[1] * (q[1] - p[1])];
    if (t[0] > 0) flush();
    push(a[0], a[1]);
    push(b[0], b[1]);
    if (t[1] < 1) flush();
  }
  flush();
  return out;
}

/** Drops points closer than THIN_PX to the last kept one; the last point always stays. */
export function thinPolyline(frame: PlotFrame, line: Polyline): Polyline {
  const out: Polyline = { x: [], y: [] };
  let last: [number, number] | null = null;
  const n = line.x.length;
  for (let k = 0; k < n; k++) {
    const u = toPlot(frame, line.x[k], line.y[k]);
    if (last && k < n - 1 && Math.hypot(u[0] - last[0], u[1] - last[1]) < THIN_PX) continue;
    out.x.push(line.x[k]);
    out.y.push(line.y[k]);
    last = u;
  }
  return out;
}

/** Clipped, then thinned: what a figure draws of a path. */
export function drawablePieces(frame: PlotFrame, line: Polyline): Polyline[] {
  return clipPolyline(frame, line)
    .map((p) => thinPolyline(frame, p))
    .filter((p) => p.x.length >= 2);
}

/** Screen length of a polyline in px. */
export function plotLength(frame: PlotFrame, line: Polyline): number {
  let len = 0;
  for (let k = 1; k < line.x.length; k++) {
    const a = toPlot(frame, line.x[k - 1], line.y[k - 1]);
    const b = toPlot(frame, line.x[k], line.y[k]);
    len += Math.hypot(b[0] - a[0], b[1] - a[1]);
  }
  return len;
}

/** The point a fraction of the way along a polyline (by screen length), with the heading there. */
export function pointAlong(
  frame: PlotFrame,
  line: Polyline,
  fraction: number,
): { x: number; y: number; angle: number } | null {
  const total = plotLength(frame, line);
  if (!(total > 0)) return null;
  let target = fraction * total;
  for (let k = 1; k < line.x.length; k++) {
    const a = toPlot(frame, line.x[k - 1], line.y[k - 1]);
    const b = toPlot(frame, line.x[k], line.y[k]);
    const seg = Math.hypot(b[0] - a[0], b[1] - a[1]);
    if (seg > 0 && (target <= seg || k === line.x.length - 1)) {
      const w = Math.min(1, target / seg);
      return {
        x: line.x[k - 1] + w * (line.x[k] - line.x[k - 1]),
        y: line.y[k - 1] + w * (line.y[k] - line.y[k - 1]),
        angle: headingOf(frame, line.x[k] - line.x[k - 1], line.y[k] - line.y[k - 1]),
      };
    }
    target -= seg;
  }
  return null;
}

/** A screen rectangle in px, y downward from the top of the plot. */
export interface ScreenBox {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export interface PlacedLabel {
  x: number;
  y: number;
  text: string;
  align: "left" | "right";
}

/** Label offsets tried in turn (px, screen y downward): above right, below right, above left, below left. */
const LABEL_CANDIDATES = [
  { align: "left", dx: 8, dy: -9 },
  { align: "left", dx: 8, dy: 11 },
  { align: "right", dx: -8, dy: -9 },
  { align: "right", dx: -8, dy: 11 },
] as const;
/** Half the height of a label line at 10 px, with a little air (px). */
const LABEL_HALF_HEIGHT = 6.5;
/** Half the side of the box a marker keeps clear (px). */
const MARKER_HALF = 6;

const overlaps = (a: ScreenBox, b: ScreenBox) =>
  a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;

export function toScreen(frame: PlotFrame, x: number, y: number): [number, number] {
  const [u, v] = toPlot(frame, x, y);
  return [u, frame.height - v];
}

/** The box a marker at (x, y) keeps clear of labels. */
export function markerBox(frame: PlotFrame, x: number, y: number): ScreenBox {
  const [u, v] = toScreen(frame, x, y);
  return { left: u - MARKER_HALF, right: u + MARKER_HALF, top: v - MARKER_HALF, bottom: v + MARKER_HALF };
}

/**
 * Places each label beside its point at the first candidate offset that stays inside the plot
 * and clear of `occupied` (markers and labels placed before); failing that, the first inside
 * the plot. Placed labels join `occupied`, so later calls avoid them.
 */
export function placeLabels(
  frame: PlotFrame,
  items: { x: number; y: number; text: string }[],
  width: (text: string) => number,
  occupied: ScreenBox[],
): PlacedLabel[] {
  return items.map((it) => {
    const [u, v] = toScreen(frame, it.x, it.y);
    const w = width(it.text);
    const boxes = LABEL_CANDIDATES.map((c) => {
      const left = c.align === "left" ? u + c.dx : u + c.dx - w;
      return {
        c,
        box: {
          left,
          right: left + w,
          top: v + c.dy - LABEL_HALF_HEIGHT,
          bottom: v + c.dy + LABEL_HALF_HEIGHT,
        },
      };
    });
    const inside = boxes.filter(
      ({ box }) => box.left >= 0 && box.right <= frame.width && box.top >= 0 && box.bottom <= frame.height,
    );
    const pick = inside.find(({ box }) => !occupied.some((o) => overlaps(o, box))) ?? inside[0] ?? boxes[0];
    occupied.push(pick.box);
    const [x, y] = fromPlot(frame, u + pick.c.dx, frame.height - (v + pick.c.dy));
    return { x: roundData(x), y: roundData(y), text: it.text, align: pick.c.align };
  });
}

/** The state window on the portrait's plot area; the basin map shares it. */
export function portraitFrame(results: Results): PlotFrame {
  const [a, b] = results.model.states;
  const wa = results.model.window[a],
    wb = results.model.window[b];
  return { lo: [wa[0], wb[0]], hi: [wa[1], wb[1]], width: PORTRAIT_PLOT.width, height: PORTRAIT_PLOT.height };
}
