import type { FaultTreeModel } from '../../shared/model-file.js';

const BOX_WIDTH = 64;
const BOX_HEIGHT = 26;
const COLUMN = 72;
const ROW = 48;

interface Placed {
  readonly id: string;
  readonly x: number;
  readonly depth: number;
  readonly children: readonly Placed[];
}

function escapeXml(text: string): string {
  return text.replace(/[<>&"]/g, (character) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;' })[character] as string);
}

function gateText(model: FaultTreeModel, id: string): string {
  const gate = model.gates.find((candidate) => candidate.id === id);
  if (!gate) return 'event';
  if (gate.type === 'atLeast') return `${gate.k} of ${gate.inputs.length}`;
  return gate.type.toUpperCase();
}

/**
 * The fault tree as an SVG picture for the report: the top at the top, each gate centred over its
 * inputs, leaves side by side (a tidy-tree layout in the manner of Reingold and Tilford, simplified: a
 * shared item is drawn under each parent). Wider than `maxLeaves` leaves is cut, and says so.
 */
export function faultTreeSvg(model: FaultTreeModel, maxLeaves = 14): { svg: string; width: number; truncated: boolean } {
  let nextLeaf = 0;
  let truncated = false;
  const place = (id: string, depth: number, path: ReadonlySet<string>): Placed | undefined => {
    const gate = model.gates.find((candidate) => candidate.id === id);
    if (!gate || path.has(id) || depth > 6) {
      if (nextLeaf >= maxLeaves) {
        truncated = true;
        return undefined;
      }
      return { id, x: nextLeaf++ * COLUMN, depth, children: [] };
    }
    const inner = new Set(path).add(id);
    const children = gate.inputs.map((input) => place(input, depth + 1, inner)).filter((child): child is Placed => child !== undefined);
    if (children.length === 0) {
      truncated = true;
      return undefined;
    }
    return { id, x: (children[0].x + children[children.length - 1].x) / 2, depth, children };
  };
  const root = place(model.top, 0, new Set());
  const parts: string[] = [];
  let maxDepth = 0;
  const draw = (node: Placed) => {
    maxDepth = Math.max(maxDepth, node.depth);
    const x = node.x + 4;
    const y = node.depth * ROW + 4;
    for (const child of node.children) {
      parts.push(`<line x1="${x + BOX_WIDTH / 2}" y1="${y + BOX_HEIGHT}" x2="${child.x + 4 + BOX_WIDTH / 2}" y2="${child.depth * ROW + 4}" stroke="#777" stroke-width="0.6"/>`);
      draw(child);
    }
    const isGate = node.children.length > 0;
    parts.push(`<rect x="${x}" y="${y}" width="${BOX_WIDTH}" height="${BOX_HEIGHT}" rx="${isGate ? 2 : 8}" fill="${isGate ? '#e8f0fb' : '#ffffff'}" stroke="#1f5fbf" stroke-width="0.7"/>`);
    parts.push(`<text x="${x + BOX_WIDTH / 2}" y="${y + 11}" font-size="6.5" text-anchor="middle" fill="#111">${escapeXml(node.id.length > 16 ? `${node.id.slice(0, 15)}…` : node.id)}</text>`);
    parts.push(`<text x="${x + BOX_WIDTH / 2}" y="${y + 21}" font-size="5.5" text-anchor="middle" fill="#444">${escapeXml(gateText(model, node.id))}</text>`);
  };
  if (root) draw(root);
  const width = Math.max(1, nextLeaf) * COLUMN;
  const height = (maxDepth + 1) * ROW;
  return { svg: `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">${parts.join('')}</svg>`, width, truncated };
}
