import pg from 'pg';
import type { SolveStatus } from '../../shared/api/solves.js';

/**
 * Solve notices travel through PostgreSQL LISTEN/NOTIFY, so an API process learns of the progress of a
 * solve that runs in a solver process on another machine, and a solver process learns of a cancel sent
 * to any API process. Notices are hints: the solves table stays the record, and readers re-read it.
 */
export const SOLVE_EVENTS_CHANNEL = 'proofline_solve_events';

export type SolveNotice =
  | { readonly kind: 'progress'; readonly solveId: string; readonly progress: number; readonly stage: string | null }
  | { readonly kind: 'status'; readonly solveId: string; readonly status: SolveStatus }
  | { readonly kind: 'cancel'; readonly solveId: string }
  | { readonly kind: 'queued'; readonly solveId: string };

export type SolveNoticeListener = (notice: SolveNotice) => void;

export interface SolveEvents {
  /** Calls `listener` with every notice from any process; returns the unsubscribe function. */
  subscribe(listener: SolveNoticeListener): () => void;
  /** Sends a notice to every process listening (this one included). */
  publish(notice: SolveNotice): Promise<void>;
  close(): Promise<void>;
}

export interface SolveEventsOptions {
  readonly connectionString: string;
  /** Used to publish, so a notice waits for no dedicated connection. */
  readonly pool: pg.Pool;
  readonly log: (message: string, error?: unknown) => void;
  /** Delay before listening again after the connection dropped. Default 1 s. */
  readonly reconnectDelayMs?: number;
}

function parseNotice(payload: string | undefined): SolveNotice | undefined {
  if (!payload) return undefined;
  try {
    const notice = JSON.parse(payload) as SolveNotice;
    return typeof notice.solveId === 'string' ? notice : undefined;
  } catch {
    return undefined;
  }
}

/** Opens the listening connection; it reconnects by itself when PostgreSQL restarts. */
export async function connectSolveEvents(options: SolveEventsOptions): Promise<SolveEvents> {
  const listeners = new Set<SolveNoticeListener>();
  const reconnectDelayMs = options.reconnectDelayMs ?? 1000;
  let client: pg.Client | undefined;
  let closed = false;
  let reconnectTimer: NodeJS.Timeout | undefined;

  const dispatch = (notice: SolveNotice) => {
    for (const listener of listeners) {
      try {
        listener(notice);
      } catch (error) {
        options.log('a solve notice listener failed', error);
      }
    }
  };

  const scheduleReconnect = () => {
    if (closed || reconnectTimer) return;
    reconnectTimer = setTimeout(() => {
      reconnectTimer = undefined;
      listen().catch((error) => {
        options.log('could not listen for solve notices; retrying', error);
        scheduleReconnect();
      });
    }, reconnectDelayMs);
  };

  const listen = async () => {
    const next = new pg.Client({ connectionString: options.connectionString, application_name: 'proofline-solve-events' });
    next.on('notification', (message) => {
      const notice = parseNotice(message.payload);
      if (notice) dispatch(notice);
    });
    const lost = () => {
      if (client === next) client = undefined;
      scheduleReconnect();
    };
    next.on('error', (error) => {
      options.log('solve notice connection failed', error);
      next.end().catch(() => undefined);
      lost();
    });
    next.on('end', lost);
    await next.connect();
    await next.query(`LISTEN ${SOLVE_EVENTS_CHANNEL}`);
    if (closed) {
      await next.end();
      return;
    }
    client = next;
  };

  await listen();

  return {
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    async publish(notice) {
      await options.pool.query('SELECT pg_notify($1, $2)', [SOLVE_EVENTS_CHANNEL, JSON.stringify(notice)]);
    },
    async close() {
      closed = true;
      if (reconnectTimer) clearTimeout(reconnectTimer);
      listeners.clear();
      await client?.end();
      client = undefined;
    },
  };
}
