import { Router, type Response } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { solveListQuery, startSolveBody, type Solve } from '../../shared/api/solves.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import type { AppContext } from '../app-context.js';
import type { SolveQueue } from '../queue/solve-queue.js';
import type { SolveEvents } from './solve-events.js';
import { createSolveService } from './solve-service.js';

const modelParams = z.object({ projectId: recordId, modelId: recordId });
const solveParams = z.object({ projectId: recordId, solveId: recordId });

/** What the API needs to hand solves to the solver processes (server/solves/solving.ts makes it). */
export interface SolvingDeps {
  readonly queue: Pick<SolveQueue, 'send' | 'cancel'>;
  readonly events: SolveEvents;
  /** The solver version results are looked up with (solver/index.ts SOLVER_VERSION). */
  readonly solverVersion: string;
  /** The solver processes' time limit per solve. */
  readonly timeLimitMs: number;
  /** The stream re-reads the solve this often, in case a notice was missed. Default 5 s. */
  readonly recheckMs?: number;
  /** A comment line keeps idle connections open through proxies. Default 15 s. */
  readonly keepAliveMs?: number;
}

function sendEvent(res: Response, event: string, data: unknown): void {
  res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
}

function summaryOf(solve: Solve) {
  const { result: _result, ...summary } = solve;
  return summary;
}

/** Solves of a project's models (routes: shared/api/index.ts; events: shared/api/solves.ts). */
export function solvesRouter({ db }: AppContext, options: SolvingDeps): Router {
  const { events } = options;
  const service = createSolveService({ db, ...options });
  const recheckMs = options.recheckMs ?? 5000;
  const keepAliveMs = options.keepAliveMs ?? 15_000;
  const router = Router();

  router.post('/projects/:projectId/models/:modelId/solves', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(startSolveBody, req.body, 'body');
    const { solve, cached } = await service.start(requireUser(req), projectId, modelId, body);
    res.status(cached ? 200 : 202).json(solve);
  });

  router.get('/projects/:projectId/models/:modelId/solves', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const query = parseInput(solveListQuery, req.query, 'query');
    res.json(await service.list(requireUser(req), projectId, modelId, query));
  });

  router.get('/projects/:projectId/solves/:solveId', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    res.json(await service.get(requireUser(req), projectId, solveId));
  });

  router.post('/projects/:projectId/solves/:solveId/cancel', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    res.json(await service.cancel(requireUser(req), projectId, solveId));
  });

  router.get('/projects/:projectId/solves/:solveId/events', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    const first = await service.get(requireUser(req), projectId, solveId);
    res.writeHead(200, {
      'Content-Type': 'text/event-stream; charset=utf-8',
      'Cache-Control': 'no-cache, no-transform',
      Connection: 'keep-alive',
      'X-Accel-Buffering': 'no',
    });
    res.flushHeaders();

    let lastStatus = first.status;
    let ended = false;
    let checking = false;
    const timers: NodeJS.Timeout[] = [];
    let unsubscribe: () => void = () => undefined;
    const end = () => {
      if (ended) return;
      ended = true;
      unsubscribe();
      for (const timer of timers) clearInterval(timer);
      res.end();
    };
    const recheck = async () => {
      if (ended || checking) return;
      checking = true;
      try {
        const solve = await service.current(projectId, solveId);
        if (ended) return;
        if (!solve) return end();
        if (solve.status !== lastStatus) {
          lastStatus = solve.status;
          sendEvent(res, 'status', summaryOf(solve));
        }
        if (service.isFinished(solve)) {
          sendEvent(res, 'done', solve);
          end();
        }
      } catch {
        // The database is briefly out of reach: the next notice or recheck tries again.
      } finally {
        checking = false;
      }
    };

    sendEvent(res, 'status', summaryOf(first));
    if (service.isFinished(first)) {
      sendEvent(res, 'done', first);
      end();
      return;
    }
    unsubscribe = events.subscribe((notice) => {
      if (ended || notice.solveId !== solveId) return;
      if (notice.kind === 'progress') sendEvent(res, 'progress', { progress: notice.progress, stage: notice.stage });
      if (notice.kind === 'status') void recheck();
    });
    timers.push(setInterval(() => void recheck(), recheckMs));
    timers.push(setInterval(() => res.write(': keep-alive\n\n'), keepAliveMs));
    req.on('close', end);
    void recheck();
  });

  return router;
}
