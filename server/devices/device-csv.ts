import Papa from 'papaparse';
import {
  deviceFields,
  EXPORT_COLUMNS,
  IMPORT_FIELDS,
  MAX_IMPORT_ROWS,
  PER_HOUR_FACTOR,
  RATE_FIELDS,
  type DeviceFields,
  type DeviceSummary,
  type ImportField,
  type ImportMapping,
  type ImportRateUnit,
} from '../../shared/api/devices.js';
import type { ValidationIssue } from '../../shared/api/errors.js';

/**
 * Reading and writing the library as CSV (papaparse). Reading turns each row into record fields
 * (rates per hour) or the list of problems of its cells; it writes nothing.
 */

export interface ParsedCsv {
  readonly headers: string[];
  readonly mapping: Record<ImportField, string | null>;
  readonly rows: ParsedCsvRow[];
  readonly fileErrors: string[];
}

export interface ParsedCsvRow {
  readonly line: number;
  readonly cells: Partial<Record<ImportField, string>>;
  readonly fields: DeviceFields | null;
  readonly errors: ValidationIssue[];
}

/** Rates below this per hour (0.001 FIT) are taken as a wrong unit rather than a real figure (common practice). */
const SMALLEST_PLAUSIBLE_RATE = 1e-12;
/** Rates above this per hour (a failure every 100 h) are taken as a wrong unit (common practice). */
const LARGEST_PLAUSIBLE_RATE = 1e-2;

const UNIT_NAMES: Record<ImportRateUnit, string> = { perHour: 'per hour', fit: 'FIT', perYear: 'per year' };

/** Reads one CSV text: headers, the mapping used, and each data row as fields or errors. */
export function parseDeviceCsv(csv: string, requested: ImportMapping, rateUnit: ImportRateUnit): ParsedCsv {
  const parsed = Papa.parse<string[]>(csv.replace(/^\uFEFF/, ''), { skipEmptyLines: 'greedy' });
  const [headerRow, ...dataRows] = parsed.data;
  const fileErrors = parsed.errors
    .filter((error) => error.type !== 'Delimiter')
    .map((error) => `line ${(error.row ?? 0) + 1}: ${error.message}`);
  const headers = (headerRow ?? []).map((header) => header.trim());
  const mapping = resolveMapping(headers, requested, fileErrors);
  if (headers.length === 0) fileErrors.push('the file has no header line');
  if (dataRows.length > MAX_IMPORT_ROWS) {
    fileErrors.push(`the file has ${dataRows.length} rows; at most ${MAX_IMPORT_ROWS} are imported at once`);
  }
  const rows = dataRows.slice(0, MAX_IMPORT_ROWS).map((cells, index) => readRow(headers, mapping, cells, index + 2, rateUnit));
  return { headers, mapping, rows, fileErrors };
}

function resolveMapping(headers: string[], requested: ImportMapping, fileErrors: string[]): Record<ImportField, string | null> {
  const byLowerName = new Map(headers.map((header) => [header.toLowerCase(), header]));
  const mapping = {} as Record<ImportField, string | null>;
  for (const field of IMPORT_FIELDS) {
    const asked = requested[field];
    if (asked !== undefined) {
      const found = byLowerName.get(asked.toLowerCase());
      if (!found) fileErrors.push(`${field} is mapped to column "${asked}", which the file does not have`);
      mapping[field] = found ?? null;
    } else {
      mapping[field] = byLowerName.get(field.toLowerCase()) ?? null;
    }
  }
  return mapping;
}

/** A text cell as the user meant it: the "'" that an export put before a formula-like value is removed. */
function unescapeText(text: string): string {
  return /^'[=+\-@\t\r]/.test(text) ? text.slice(1) : text;
}

function readNumber(text: string): number | undefined {
  const normalized = text.replace(/\s/g, '').replace(',', '.');
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(normalized)) return undefined;
  return Number(normalized);
}

function normalizedWord(text: string): string {
  return text.trim().toLowerCase().replace(/[\s_]+/g, '-');
}

function readRow(
  headers: string[],
  mapping: Record<ImportField, string | null>,
  rowCells: string[],
  line: number,
  rateUnit: ImportRateUnit,
): ParsedCsvRow {
  const cells: Partial<Record<ImportField, string>> = {};
  for (const field of IMPORT_FIELDS) {
    const header = mapping[field];
    if (header === null) continue;
    cells[field] = unescapeText((rowCells[headers.indexOf(header)] ?? '').trim());
  }
  const errors: ValidationIssue[] = [];
  const candidate: Record<string, unknown> = {};
  const text = (field: ImportField) => cells[field] ?? '';
  const required = (field: ImportField) => {
    if (mapping[field] === null) errors.push({ path: field, message: 'has no column in the file (map one)' });
    else if (text(field) === '') errors.push({ path: field, message: 'is empty' });
  };

  for (const field of ['maker', 'model', 'sourceReference'] as const) {
    required(field);
    candidate[field] = text(field);
  }
  candidate['description'] = text('description');

  required('category');
  if (text('category') !== '') candidate['category'] = normalizedWord(text('category'));
  required('sourceKind');
  if (text('sourceKind') !== '') candidate['sourceKind'] = normalizedWord(text('sourceKind'));
  required('architectureType');
  if (text('architectureType') !== '') candidate['architectureType'] = text('architectureType').replace(/^type\s*/i, '').toUpperCase();

  for (const field of RATE_FIELDS) {
    required(field);
    if (text(field) === '') continue;
    const value = readNumber(text(field));
    if (value === undefined) {
      errors.push({ path: field, message: `"${text(field)}" is not a number` });
      continue;
    }
    const perHour = value * PER_HOUR_FACTOR[rateUnit];
    if (perHour > LARGEST_PLAUSIBLE_RATE || (perHour > 0 && perHour < SMALLEST_PLAUSIBLE_RATE)) {
      errors.push({
        path: field,
        message: `${text(field)} ${UNIT_NAMES[rateUnit]} is ${perHour.toExponential(2)} per hour, outside ${SMALLEST_PLAUSIBLE_RATE} to ${LARGEST_PLAUSIBLE_RATE}; is the unit right?`,
      });
      continue;
    }
    candidate[field] = perHour;
  }

  required('hardwareFaultTolerance');
  const numberCell = (field: ImportField, optional: boolean, scale = 1) => {
    if (text(field) === '') {
      if (optional) candidate[field] = null;
      return;
    }
    const percent = text(field).endsWith('%');
    const value = readNumber(percent ? text(field).slice(0, -1) : text(field));
    if (value === undefined) errors.push({ path: field, message: `"${text(field)}" is not a number` });
    else candidate[field] = percent ? value / 100 : value * scale;
  };
  numberCell('hardwareFaultTolerance', false);
  numberCell('systematicCapability', true);
  numberCell('proofTestCoverage', true);
  numberCell('usefulLifeYears', true);
  candidate['validUntil'] = text('validUntil') === '' ? null : text('validUntil');

  const result = deviceFields.safeParse(candidate);
  if (!result.success) {
    const known = new Set(errors.map((error) => error.path));
    for (const issue of result.error.issues) {
      const path = issue.path.map(String).join('.');
      if (!known.has(path)) errors.push({ path, message: issue.message });
    }
  }
  return { line, cells, fields: errors.length === 0 && result.success ? result.data : null, errors };
}

/** Whether two versions carry the same figures (what a re-import of an unchanged row would write). */
export function sameFigures(a: DeviceFields, b: DeviceFields): boolean {
  return IMPORT_FIELDS.every((field) => {
    const left = a[field];
    const right = b[field];
    if (typeof left === 'number' && typeof right === 'number') return Math.abs(left - right) <= 1e-12 * Math.max(Math.abs(left), Math.abs(right));
    return left === right;
  });
}

/**
 * The library as CSV, one line per record (its current version, rates per hour), with the headers the
 * import reads. Text that a spreadsheet would run as a formula (starting with = + - @, tab or CR) gets a
 * leading "'" (papaparse escapeFormulae), which the import removes again.
 */
export function devicesToCsv(list: readonly DeviceSummary[]): string {
  const data = list.map((item) =>
    EXPORT_COLUMNS.map((column) => {
      const value = column === 'id' ? item.id : item[column];
      return value ?? '';
    }),
  );
  return Papa.unparse({ fields: [...EXPORT_COLUMNS], data }, { escapeFormulae: true, newline: '\r\n' });
}
