/// <reference lib="webworker" />
import ELK from 'elkjs/lib/elk.bundled.js';
import type { ElkNode } from 'elkjs/lib/elk-api';

// Runs ELK off the main thread so laying out a large model never blocks the canvas.
const elk = new ELK();

addEventListener('message', ({ data }: MessageEvent<{ id: number; graph: ElkNode }>) => {
  elk.layout(data.graph).then(
    (graph) => postMessage({ id: data.id, graph }),
    (error: unknown) => postMessage({ id: data.id, error: error instanceof Error ? error.message : String(error) }),
  );
});
