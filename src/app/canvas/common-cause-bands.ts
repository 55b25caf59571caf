import type { CanvasNode } from './canvas-view';
import type { Position } from './model-graph';

export interface Size {
  readonly width: number;
  readonly height: number;
}

export interface Rect extends Position, Size {}

export interface BandLink {
  readonly from: Position;
  readonly to: Position;
}

/**
 * How a common-cause group is drawn: a tinted band under the cards that encloses the group card and
 * each member card in a rounded pad and links them by ribbons along the shortest tree through their
 * centres, so the eye follows one shape from the group to every event that shares its cause.
 */
export interface CommonCauseBand {
  /** The group's id. */
  readonly group: string;
  readonly tint: number;
  /** The pads: each card's box grown by BAND_PADDING (the group card's first). */
  readonly pads: readonly Rect[];
  /** The ribbons, between card centres. */
  readonly links: readonly BandLink[];
  /** One SVG path of every pad and ribbon, all wound clockwise, so that their union fills as one shape. */
  readonly path: string;
  /** The box around the whole band. */
  readonly bounds: Rect;
}

/** Space between a card and the edge of its pad, in canvas pixels. */
export const BAND_PADDING = 12;
/** Corner radius of a pad. */
export const BAND_RADIUS = 22;
/** Width of a ribbon between two pads. */
export const RIBBON_WIDTH = 30;
/** A card's size before the browser has measured it (the cards are 216 px wide; a typical height). */
export const DEFAULT_CARD_SIZE: Size = { width: 216, height: 112 };

/**
 * The bands of the common-cause groups of a fault tree's canvas view. `sizes` holds the measured size of
 * cards by canvas id; a card not measured yet counts as DEFAULT_CARD_SIZE. Groups and their members come
 * in the order of the view.
 */
export function commonCauseBands(nodes: readonly CanvasNode[], sizes: ReadonlyMap<string, Size>): CommonCauseBand[] {
  const rectOf = (node: CanvasNode): Rect => ({ ...node.position, ...(sizes.get(node.id) ?? DEFAULT_CARD_SIZE) });
  const members = new Map<string, Rect[]>();
  for (const node of nodes) {
    if (!node.band) continue;
    members.set(node.band.group, [...(members.get(node.band.group) ?? []), rectOf(node)]);
  }
  return nodes
    .filter((node) => node.variant === 'ccf')
    .map((node) => {
      const cards = [rectOf(node), ...(members.get(node.ref.id) ?? [])];
      const pads = cards.map((card) => grow(card, BAND_PADDING));
      const links = shortestTree(cards.map(centre));
      const path = [...pads.map((pad) => roundedRectPath(pad, BAND_RADIUS)), ...links.flatMap((link) => ribbonPath(link, RIBBON_WIDTH / 2))].join(' ');
      return { group: node.ref.id, tint: node.tint ?? 0, pads, links, path, bounds: boundsOf(pads) };
    });
}

function grow(rect: Rect, by: number): Rect {
  return { x: rect.x - by, y: rect.y - by, width: rect.width + 2 * by, height: rect.height + 2 * by };
}

function centre(rect: Rect): Position {
  return { x: rect.x + rect.width / 2, y: rect.y + rect.height / 2 };
}

function distance(a: Position, b: Position): number {
  return Math.hypot(a.x - b.x, a.y - b.y);
}

/**
 * The minimum spanning tree of the points under straight-line distance, by Prim's algorithm (Cormen,
 * Leiserson, Rivest and Stein, Introduction to Algorithms, section 23.2), O(n²) on the complete graph:
 * a group has a handful of members. Ties go to the lower index, so the tree is the same on every run.
 */
export function shortestTree(points: readonly Position[]): BandLink[] {
  if (points.length < 2) return [];
  const inTree = new Array<boolean>(points.length).fill(false);
  const best = new Array<number>(points.length).fill(Infinity);
  const via = new Array<number>(points.length).fill(-1);
  const links: BandLink[] = [];
  best[0] = 0;
  for (let round = 0; round < points.length; round++) {
    let next = -1;
    for (let index = 0; index < points.length; index++) if (!inTree[index] && (next < 0 || best[index] < best[next])) next = index;
    inTree[next] = true;
    if (via[next] >= 0) links.push({ from: points[via[next]], to: points[next] });
    for (let index = 0; index < points.length; index++) {
      const length = distance(points[next], points[index]);
      if (!inTree[index] && length < best[index]) {
        best[index] = length;
        via[index] = next;
      }
    }
  }
  return links;
}

const round = (value: number): number => Math.round(value * 10) / 10;

/** A rounded rectangle, clockwise on screen (y down): along the top to the right, down, back, up. */
function roundedRectPath(rect: Rect, radius: number): string {
  const r = Math.min(radius, rect.width / 2, rect.height / 2);
  const [left, top, right, bottom] = [rect.x, rect.y, rect.x + rect.width, rect.y + rect.height].map(round);
  return [
    `M ${round(left + r)} ${top}`,
    `H ${round(right - r)}`,
    `A ${r} ${r} 0 0 1 ${right} ${round(top + r)}`,
    `V ${round(bottom - r)}`,
    `A ${r} ${r} 0 0 1 ${round(right - r)} ${bottom}`,
    `H ${round(left + r)}`,
    `A ${r} ${r} 0 0 1 ${left} ${round(bottom - r)}`,
    `V ${round(top + r)}`,
    `A ${r} ${r} 0 0 1 ${round(left + r)} ${top}`,
    'Z',
  ].join(' ');
}

/**
 * A ribbon of half-width `half` from one centre to the other, as a four-cornered outline wound clockwise
 * on screen like the pads (under the nonzero fill rule an outline wound the other way would cut a hole
 * where it crosses a pad). Its ends lie inside the pads, so they need no rounding.
 */
function ribbonPath(link: BandLink, half: number): string[] {
  const length = distance(link.from, link.to);
  if (length === 0) return [];
  const normal = { x: (-(link.to.y - link.from.y) / length) * half, y: ((link.to.x - link.from.x) / length) * half };
  const corners = [
    { x: link.from.x + normal.x, y: link.from.y + normal.y },
    { x: link.to.x + normal.x, y: link.to.y + normal.y },
    { x: link.to.x - normal.x, y: link.to.y - normal.y },
    { x: link.from.x - normal.x, y: link.from.y - normal.y },
  ];
  const ordered = signedArea(corners) < 0 ? corners.reverse() : corners;
  return [`M ${ordered.map((corner) => `${round(corner.x)} ${round(corner.y)}`).join(' L ')} Z`];
}

/** Twice the signed area of a polygon (shoelace formula); positive when clockwise on screen (y down). */
export function signedArea(points: readonly Position[]): number {
  let sum = 0;
  for (let index = 0; index < points.length; index++) {
    const a = points[index];
    const b = points[(index + 1) % points.length];
    sum += a.x * b.y - b.x * a.y;
  }
  return sum;
}

function boundsOf(rects: readonly Rect[]): Rect {
  const left = Math.min(...rects.map((rect) => rect.x));
  const top = Math.min(...rects.map((rect) => rect.y));
  const right = Math.max(...rects.map((rect) => rect.x + rect.width));
  const bottom = Math.max(...rects.map((rect) => rect.y + rect.height));
  return { x: left, y: top, width: right - left, height: bottom - top };
}
