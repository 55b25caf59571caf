import { Injectable } from '@angular/core';
import type { ElkNode } from 'elkjs/lib/elk-api';

type Reply = { id: number; graph: ElkNode } | { id: number; error: string };

/** Lays out graphs with ELK in a web worker (started on first use, one for the app). */
@Injectable({ providedIn: 'root' })
export class AutoLayout {
  private worker: Worker | null = null;
  private nextId = 1;
  private readonly waiting = new Map<number, { resolve: (graph: ElkNode) => void; reject: (error: Error) => void }>();

  layout(graph: ElkNode): Promise<ElkNode> {
    const worker = this.start();
    const id = this.nextId++;
    return new Promise((resolve, reject) => {
      this.waiting.set(id, { resolve, reject });
      worker.postMessage({ id, graph });
    });
  }

  private start(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(new URL('./layout.worker', import.meta.url), { type: 'module' });
    worker.addEventListener('message', ({ data }: MessageEvent<Reply>) => {
      const waiting = this.waiting.get(data.id);
      if (!waiting) return;
      this.waiting.delete(data.id);
      if ('error' in data) waiting.reject(new Error(`The automatic layout failed: ${data.error}`));
      else waiting.resolve(data.graph);
    });
    worker.addEventListener('error', (event) => {
      for (const waiting of this.waiting.values()) waiting.reject(new Error(`The layout worker stopped: ${event.message}`));
      this.waiting.clear();
      this.worker = null;
    });
    this.worker = worker;
    return worker;
  }
}
