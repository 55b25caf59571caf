import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { resultCsvQuery } from '../../shared/api/results.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import { resultCsv } from './csv.js';
import { loadReportData } from './report-data.js';
import { reportPdf } from './report-pdf.js';

const solveParams = z.object({ projectId: recordId, solveId: recordId });

/** A file name safe in a Content-Disposition header: letters, digits, "-", "_" and ".". */
function fileName(...parts: string[]): string {
  return parts.join('-').replace(/[^A-Za-z0-9._-]+/g, '_');
}

/** Results of a solve: the analysis beside it, the verification report and CSV tables (shared/api/results.ts). */
export function reportsRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/projects/:projectId/solves/:solveId/analysis', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    const data = await loadReportData(db, requireUser(req), projectId, solveId);
    res.json(data.analysis);
  });

  router.get('/projects/:projectId/solves/:solveId/report', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    const user = requireUser(req);
    const data = await loadReportData(db, user, projectId, solveId);
    const pdf = await reportPdf(data, new Date(), user.displayName);
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `attachment; filename="${fileName('verification', data.sif.tag, solveId.slice(0, 8))}.pdf"`);
    res.send(pdf);
  });

  router.get('/projects/:projectId/solves/:solveId/csv', async (req, res) => {
    const { projectId, solveId } = parseInput(solveParams, req.params, 'params');
    const { table } = parseInput(resultCsvQuery, req.query, 'query');
    const data = await loadReportData(db, requireUser(req), projectId, solveId);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="${fileName(data.sif.tag, table, solveId.slice(0, 8))}.csv"`);
    res.send(resultCsv(data, table));
  });

  return router;
}
