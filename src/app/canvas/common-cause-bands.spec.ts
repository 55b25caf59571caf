import { describe, expect, it } from 'vitest';
import { canvasView } from './canvas-view';
import { BAND_PADDING, DEFAULT_CARD_SIZE, commonCauseBands, shortestTree, signedArea, type BandLink, type Rect } from './common-cause-bands';
import type { FaultTreeDraft, Position } from './model-graph';

/** An invented 2oo3 pressure trip: three transmitters in one common-cause group, a valve outside it. */
function pressureTrip(positions: Record<string, Position>): FaultTreeDraft {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Invented pressure trip',
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: ['PT-1', 'PT-2', 'PT-3', 'XV-1'].map((id) => ({ id, lambdaDU: 2e-7, proofTest: { intervalHours: 8760 } })),
    gates: [
      { id: 'VOTE', type: 'atLeast', k: 2, inputs: ['PT-1', 'PT-2', 'PT-3'] },
      { id: 'TOP', type: 'or', inputs: ['VOTE', 'XV-1'] },
    ],
    ccf: [{ id: 'CCF-PT', model: 'beta', beta: 0.05, members: ['PT-1', 'PT-2', 'PT-3'] }],
    top: 'TOP',
    layout: positions,
  };
}

const LAYOUT: Record<string, Position> = {
  'PT-1': { x: 0, y: 400 },
  'PT-2': { x: 300, y: 400 },
  'PT-3': { x: 600, y: 400 },
  'ccf:CCF-PT': { x: 300, y: 700 },
  'XV-1': { x: 900, y: 400 },
  VOTE: { x: 300, y: 150 },
  TOP: { x: 600, y: 0 },
};

function totalLength(links: readonly BandLink[]): number {
  return links.reduce((sum, link) => sum + Math.hypot(link.to.x - link.from.x, link.to.y - link.from.y), 0);
}

/**
 * The vertices of each subpath of an SVG path made of M, L, H, V, A and Z commands (an arc counts by its
 * end point, which keeps the winding of a rounded rectangle).
 */
function subpathVertices(path: string): Position[][] {
  const tokens = path.trim().split(/[\s,]+/);
  const result: Position[][] = [];
  let current: Position[] = [];
  let point: Position = { x: 0, y: 0 };
  let index = 0;
  const next = (): number => Number(tokens[index++]);
  while (index < tokens.length) {
    const command = tokens[index++];
    if (command === 'M') {
      if (current.length > 0) result.push(current);
      point = { x: next(), y: next() };
      current = [point];
    } else if (command === 'L') {
      point = { x: next(), y: next() };
      current.push(point);
    } else if (command === 'H') {
      point = { x: next(), y: point.y };
      current.push(point);
    } else if (command === 'V') {
      point = { x: point.x, y: next() };
      current.push(point);
    } else if (command === 'A') {
      index += 5;
      point = { x: next(), y: next() };
      current.push(point);
    } else if (command === 'Z') {
      result.push(current);
      current = [];
    } else {
      throw new Error(`unexpected path command ${command}`);
    }
  }
  if (current.length > 0) result.push(current);
  return result;
}

function contains(outer: Rect, inner: Rect): boolean {
  return outer.x <= inner.x && outer.y <= inner.y && outer.x + outer.width >= inner.x + inner.width && outer.y + outer.height >= inner.y + inner.height;
}

/** A seeded pseudo-random generator (mulberry32, common practice), so every run draws the same points. */
function seeded(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * The shortest spanning tree by brute force: every labelled tree on n points is the tree of exactly one
 * Prüfer sequence of length n - 2 (Cayley's formula, n^(n-2) trees), decoded here one by one.
 */
function bruteForceShortestLength(points: readonly Position[]): number {
  const n = points.length;
  if (n < 2) return 0;
  if (n === 2) return Math.hypot(points[1].x - points[0].x, points[1].y - points[0].y);
  let best = Infinity;
  const sequence = new Array<number>(n - 2).fill(0);
  for (;;) {
    const degree = new Array<number>(n).fill(1);
    for (const value of sequence) degree[value]++;
    let length = 0;
    for (const value of sequence) {
      const leaf = degree.findIndex((count) => count === 1);
      length += Math.hypot(points[leaf].x - points[value].x, points[leaf].y - points[value].y);
      degree[leaf]--;
      degree[value]--;
    }
    const [u, v] = degree.flatMap((count, at) => (count === 1 ? [at] : []));
    length += Math.hypot(points[u].x - points[v].x, points[u].y - points[v].y);
    best = Math.min(best, length);
    let position = sequence.length - 1;
    while (position >= 0 && sequence[position] === n - 1) sequence[position--] = 0;
    if (position < 0) return best;
    sequence[position]++;
  }
}

describe('common-cause bands', () => {
  it('pads the group card and every member, and links them along the shortest tree through their centres', () => {
    const view = canvasView(pressureTrip(LAYOUT), []);
    const [band] = commonCauseBands(view.nodes, new Map());
    expect(band.group).toBe('CCF-PT');
    // The group card's pad first, then the three transmitters; the valve outside the group has none.
    expect(band.pads).toHaveLength(4);
    expect(band.pads[0]).toEqual({ x: 300 - BAND_PADDING, y: 700 - BAND_PADDING, width: DEFAULT_CARD_SIZE.width + 2 * BAND_PADDING, height: DEFAULT_CARD_SIZE.height + 2 * BAND_PADDING });
    expect(band.pads.some((pad) => pad.x === 900 - BAND_PADDING)).toBe(false);
    // Centres (x + 108, y + 56): the transmitters 300 apart in a row, the group 300 below the middle one.
    // The shortest tree is the row plus the drop from PT-2 (3 x 300 = 900, worked by hand); linking the
    // group to PT-1 or PT-3 instead would cost 300√2 ≈ 424.
    expect(band.links).toHaveLength(3);
    expect(totalLength(band.links)).toBeCloseTo(900, 9);
    const groupCentre = { x: 408, y: 756 };
    const touchingGroup = band.links.filter((link) => [link.from, link.to].some((end) => end.x === groupCentre.x && end.y === groupCentre.y));
    expect(touchingGroup).toHaveLength(1);
    expect([touchingGroup[0].from, touchingGroup[0].to]).toContainEqual({ x: 408, y: 456 });
  });

  it('encloses each card as the browser measured it, with the padding on every side', () => {
    const view = canvasView(pressureTrip(LAYOUT), []);
    const sizes = new Map([
      ['event:PT-1', { width: 216, height: 160 }],
      ['ccf:CCF-PT', { width: 216, height: 90 }],
    ]);
    const [band] = commonCauseBands(view.nodes, sizes);
    const cards: Rect[] = [
      { x: 300, y: 700, width: 216, height: 90 },
      { x: 0, y: 400, width: 216, height: 160 },
      { x: 300, y: 400, ...DEFAULT_CARD_SIZE },
      { x: 600, y: 400, ...DEFAULT_CARD_SIZE },
    ];
    cards.forEach((card, index) => {
      const pad = band.pads[index];
      expect(pad.x).toBe(card.x - BAND_PADDING);
      expect(pad.y).toBe(card.y - BAND_PADDING);
      expect(pad.x + pad.width).toBe(card.x + card.width + BAND_PADDING);
      expect(pad.y + pad.height).toBe(card.y + card.height + BAND_PADDING);
      expect(contains(band.bounds, pad)).toBe(true);
    });
    expect(band.bounds).toEqual({ x: -BAND_PADDING, y: 400 - BAND_PADDING, width: 816 + 2 * BAND_PADDING, height: 390 + 2 * BAND_PADDING });
  });

  it('winds every pad and ribbon clockwise, whichever way the members lie, so the union fills without holes', () => {
    // Members above, below, left and right of the group card, and one on a diagonal.
    const layout: Record<string, Position> = { ...LAYOUT, 'ccf:CCF-PT': { x: 400, y: 400 }, 'PT-1': { x: 400, y: 0 }, 'PT-2': { x: -100, y: 420 }, 'PT-3': { x: 900, y: 900 } };
    const view = canvasView(pressureTrip(layout), []);
    const [band] = commonCauseBands(view.nodes, new Map());
    const subpaths = subpathVertices(band.path);
    expect(subpaths).toHaveLength(band.pads.length + band.links.length);
    for (const vertices of subpaths) expect(signedArea(vertices)).toBeGreaterThan(0);
  });

  it('draws a group without members as its own pad and tints every band as its group card', () => {
    const model = pressureTrip(LAYOUT);
    const withSpare: FaultTreeDraft = {
      ...model,
      ccf: [...model.ccf!, { id: 'CCF-SPARE', model: 'beta', beta: 0.1, members: [] }],
      layout: { ...LAYOUT, 'ccf:CCF-SPARE': { x: 1200, y: 700 } },
    };
    const view = canvasView(withSpare, []);
    const bands = commonCauseBands(view.nodes, new Map());
    expect(bands.map((band) => band.group)).toEqual(['CCF-PT', 'CCF-SPARE']);
    expect(bands[1].pads).toHaveLength(1);
    expect(bands[1].links).toEqual([]);
    for (const band of bands) expect(band.tint).toBe(view.nodes.find((node) => node.id === `ccf:${band.group}`)!.tint);
    expect(bands[0].tint).not.toBe(bands[1].tint);
  });

  it('finds a tree as short as the shortest of all spanning trees (checked by brute force over Prüfer sequences)', () => {
    const random = seeded(61508);
    for (let trial = 0; trial < 40; trial++) {
      const count = 2 + Math.floor(random() * 5);
      const points = Array.from({ length: count }, () => ({ x: Math.round(random() * 2000), y: Math.round(random() * 1200) }));
      const tree = shortestTree(points);
      expect(tree).toHaveLength(count - 1);
      // Tolerance 1e-6 px: the two sums add the same lengths in another order.
      expect(Math.abs(totalLength(tree) - bruteForceShortestLength(points))).toBeLessThan(1e-6);
      // A spanning tree reaches every point.
      const reached = new Set([0]);
      for (let pass = 0; pass < count; pass++) {
        for (const link of tree) {
          const a = points.indexOf(link.from);
          const b = points.indexOf(link.to);
          if (reached.has(a) || reached.has(b)) {
            reached.add(a);
            reached.add(b);
          }
        }
      }
      expect(reached.size).toBe(count);
    }
  });
});
