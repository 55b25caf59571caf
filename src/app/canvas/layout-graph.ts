import type { ElkNode } from 'elkjs/lib/elk-api';
import type { CanvasView } from './canvas-view';
import type { EditableModel, Layout } from './model-graph';
import { layoutKey } from './model-graph';

/** Card size the layout reserves (the cards are at most this big, see canvas.scss). */
export const CARD_SIZE = { width: 216, height: 124 };

/**
 * The ELK graph of a model's canvas: layered, top-down for fault trees (inputs below the gate they feed,
 * so the edges, which run from an input up to its gate, point up) and left-right for state models.
 */
export function layoutGraph(model: EditableModel, view: CanvasView): ElkNode {
  const nodeIds = new Set(view.nodes.map((node) => node.id));
  const stripConnector = (connector: string): string => connector.replace(/>(out|in)$/, '');
  return {
    id: 'root',
    layoutOptions: {
      'elk.algorithm': 'layered',
      'elk.direction': model.kind === 'fault-tree' ? 'UP' : 'RIGHT',
      'elk.spacing.nodeNode': '48',
      'elk.layered.spacing.nodeNodeBetweenLayers': '72',
      'elk.layered.crossingMinimization.strategy': 'LAYER_SWEEP',
      // Fewer sweeps and the linear-time node placement: several times faster on a few hundred cards,
      // with layouts that read as well for trees (measured with scripts/bench-canvas.ts).
      'elk.layered.thoroughness': '2',
      'elk.layered.nodePlacement.strategy': 'BRANDES_KOEPF',
      'elk.separateConnectedComponents': 'true',
    },
    children: view.nodes.map((node) => ({ id: node.id, ...CARD_SIZE })),
    edges: view.connections
      .map((connection) => ({ id: connection.id, sources: [stripConnector(connection.source)], targets: [stripConnector(connection.target)] }))
      .filter((edge) => nodeIds.has(edge.sources[0]) && nodeIds.has(edge.targets[0]) && edge.sources[0] !== edge.targets[0]),
  };
}

/** Reads the positions ELK computed into the model's layout record. */
export function layoutFromElk(view: CanvasView, laidOut: ElkNode): Layout {
  const byId = new Map(view.nodes.map((node) => [node.id, node]));
  const layout: Record<string, { x: number; y: number }> = {};
  for (const child of laidOut.children ?? []) {
    const node = byId.get(child.id);
    if (node) layout[layoutKey(node.ref)] = { x: Math.round(child.x ?? 0), y: Math.round(child.y ?? 0) };
  }
  return layout;
}
