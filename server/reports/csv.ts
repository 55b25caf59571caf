import type { ResultTable } from '../../shared/api/results.js';
import { contributionsOf } from '../../solver/analysis/index.js';
import type { ReportData } from './report-data.js';

export type CsvCell = string | number | null;

/**
 * One CSV field (RFC 4180: quoted when it holds a comma, quote or line break; quotes doubled). A text
 * cell that a spreadsheet would read as a formula (starting with =, +, -, @, tab or carriage return) is
 * prefixed with an apostrophe, as the OWASP guidance on CSV injection advises; numbers stay numbers.
 */
export function csvField(cell: CsvCell): string {
  if (cell === null) return '';
  if (typeof cell === 'number') return Number.isFinite(cell) ? String(cell) : '';
  const text = /^[=+\-@\t\r]/.test(cell) ? `'${cell}` : cell;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function toCsv(header: readonly string[], rows: readonly (readonly CsvCell[])[]): string {
  return [header, ...rows].map((row) => row.map(csvField).join(',')).join('\r\n') + '\r\n';
}

function labelsOf(data: ReportData): Map<string, string> {
  const labels = new Map<string, string>();
  if (data.model.kind === 'fault-tree') {
    for (const item of [...data.model.events, ...data.model.gates, ...(data.model.ccf ?? [])]) labels.set(item.id, item.label ?? item.id);
  }
  return labels;
}

/** The curve: hours and PFD(t), and w(t) per hour as a third column when the engine computed it. */
export function curveCsv(curve: ReportData['result']['curve']): string {
  const { hours, pfd, frequency } = curve;
  if (!frequency) return toCsv(['hours', 'pfd'], hours.map((time, index) => [time, pfd[index]]));
  return toCsv(['hours', 'pfd', 'frequency_per_hour'], hours.map((time, index) => [time, pfd[index], frequency[index]]));
}

/** The rows of one results table as CSV. */
export function resultCsv(data: ReportData, table: ResultTable): string {
  const { result, analysis } = data;
  switch (table) {
    case 'curve':
      return curveCsv(result.curve);
    case 'cut-sets':
      return toCsv(['rank', 'events', 'order', 'probability', 'share'], result.cutSets.map((set, index) => [index + 1, set.events.join(' '), set.order, set.probability, set.share]));
    case 'importance': {
      const labels = labelsOf(data);
      return toCsv(
        ['id', 'label', 'kind', 'birnbaum', 'fussell_vesely', 'risk_achievement_worth', 'risk_reduction_worth', 'share'],
        result.importance.map((item) => [item.id, labels.get(item.id) ?? item.id, item.kind, item.birnbaum, item.fussellVesely, item.riskAchievementWorth, item.riskReductionWorth, item.share]),
      );
    }
    case 'contributions': {
      const rows = contributionsOf(result, analysis.constraints ?? [], labelsOf(data));
      return toCsv(['id', 'label', 'kind', 'share', 'pfd_avg_contribution'], rows.map((row) => [row.id, row.label, row.kind, row.share, row.pfdAvg]));
    }
    case 'constraints':
      return toCsv(
        ['subsystem', 'label', 'voting', 'hft', 'sff', 'device_type', 'route_1h_max_sil', 'iec61511_max_sil', 'systematic_capability', 'notes'],
        (analysis.constraints ?? []).map((row) => [row.id, row.label, row.voting, row.hft, row.sff, row.deviceType, row.route1HMaxSil, row.iec61511MaxSil, row.systematicCapability, row.notes.join('; ')]),
      );
  }
}
