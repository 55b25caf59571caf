import type { Express } from 'express';
import fc from 'fast-check';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { deviceList, importPreview, importResult, IMPORT_FIELDS } from '../../shared/api/devices.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld } from './helpers/world.js';

// Robustness (issue 10): malformed CSV files, mappings and bodies posted to the device library's import
// routes (preview and confirm). The rule is ours: a 4xx with a message, or a preview / import whose answer
// matches the contract (shared/api/devices.ts) and names each faulty row; never a 500, and the server still
// imports a good file afterwards. Seeds are fixed so a failure replays.

const HEADER = ['Maker', 'Type', 'Kind', 'LDU', 'LDD', 'LSU', 'LSD', 'Arch', 'HFT', 'SC', 'PTC', 'Life', 'Source', 'Reference', 'Valid'];
const MAPPING: Record<string, string> = {
  maker: 'Maker', model: 'Type', category: 'Kind', lambdaDU: 'LDU', lambdaDD: 'LDD', lambdaSU: 'LSU', lambdaSD: 'LSD',
  architectureType: 'Arch', hardwareFaultTolerance: 'HFT', systematicCapability: 'SC', proofTestCoverage: 'PTC',
  usefulLifeYears: 'Life', sourceKind: 'Source', sourceReference: 'Reference', validUntil: 'Valid',
};
/** Three invented devices with rates in FIT (1 FIT = 1e-9 per hour, common practice). */
const GOOD_ROWS: readonly string[][] = [
  ['Orrin Controls (fictional)', 'OV-20 ball valve', 'valve', '350', '0', '200', '100', 'A', '0', '2', '80%', '20', 'generic handbook', 'Handbook table 4.2 (invented)', ''],
  ['Orrin Controls (fictional)', 'OA-5 actuator', 'actuator', '120', '0', '300', '0', 'A', '0', '', '0.9', '20', 'prior-use', 'Site records 2019-2025 (invented)', '2030-01-01'],
  ['Tarnby Logic (fictional)', 'TL-9 safety PLC', 'logic solver', '1.5', '498.5', '250', '250', 'B', '1', '3', '0.99', '10', 'Assessment report', 'TB-SR-77 (invented)', '2028-12-31'],
];

let database: TestDatabase;
let app: Express;
let agent: TestAgent;

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database);
  await resetDatabase(database.db);
  await seedWorld(database.db);
  agent = await signedInAgent(app, 'engineer');
});

afterAll(async () => {
  await database?.close();
});

/** A refusal must be a 4xx that says what is wrong. */
function expectRefusal(status: number, body: unknown): void {
  const shown = JSON.stringify(body).slice(0, 300);
  expect(status, shown).toBeGreaterThanOrEqual(400);
  expect(status, shown).toBeLessThan(500);
  const message = (body as { error?: { message?: unknown } }).error?.message;
  expect(typeof message === 'string' && message.length > 0, `no message in ${shown}`).toBe(true);
}

/** Cell text that tempts a number, date, enum or CSV parser into a wrong turn. */
const nastyCell = fc.oneof(
  fc.constantFrom(
    '', ' ', '"', '""', '"unclosed', 'a"b', ',', ';', '\t', '\n', '\r\n', '=1+1', '+SUM(A1)', '@cmd', '-1', '-0', '0', 'NaN', 'Infinity',
    '-Infinity', '1e400', '1e-400', '0x10', '1_000', '  5 ', '5,5', '٣', '１２', '\u0000', '\uFEFF', '\u202E', '2030-02-30', '9999-12-31',
    '0000-00-00', 'true', '50 %', '101%', '-5%', 'A', 'B', 'C', 'valve', 'sensor', 'prior-use', 'x'.repeat(5000),
  ),
  fc.string({ maxLength: 40 }),
  fc.string({ unit: 'grapheme', maxLength: 20 }),
  fc.double().map(String),
  fc.integer().map(String),
);

type Mutation =
  | { kind: 'cell'; row: number; column: number; text: string }
  | { kind: 'drop-column'; column: number; headerOnly: boolean }
  | { kind: 'duplicate-row'; row: number }
  | { kind: 'blank-line'; row: number }
  | { kind: 'short-row'; row: number; keep: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  { weight: 5, arbitrary: fc.record({ kind: fc.constant('cell' as const), row: fc.nat(3), column: fc.nat(HEADER.length - 1), text: nastyCell }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('drop-column' as const), column: fc.nat(HEADER.length - 1), headerOnly: fc.boolean() }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('duplicate-row' as const), row: fc.nat(3) }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('blank-line' as const), row: fc.nat(4) }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('short-row' as const), row: fc.nat(3), keep: fc.nat(HEADER.length) }) },
);

function applyMutation(table: string[][], change: Mutation): string[][] {
  const rows = table.map((row) => [...row]);
  switch (change.kind) {
    case 'cell':
      if (rows[change.row]) rows[change.row]![change.column] = change.text;
      return rows;
    case 'drop-column':
      return rows.map((row, index) => (change.headerOnly && index > 0 ? row : row.filter((_, column) => column !== change.column)));
    case 'duplicate-row':
      return rows[change.row] ? [...rows, [...rows[change.row]!]] : rows;
    case 'blank-line':
      return [...rows.slice(0, change.row), [], ...rows.slice(change.row)];
    case 'short-row':
      if (rows[change.row]) rows[change.row] = rows[change.row]!.slice(0, change.keep);
      return rows;
  }
}

const quoteCell = (cell: string) => (/[",\r\n]/.test(cell) ? `"${cell.replaceAll('"', '""')}"` : cell);

/** The good file with a few mutations, written with proper quoting or raw (so a stray quote or comma breaks it). */
const mutatedCsv = fc
  .record({
    mutations: fc.array(mutation, { minLength: 1, maxLength: 4 }),
    quoting: fc.constantFrom('proper', 'raw'),
    newline: fc.constantFrom('\n', '\r\n', '\r'),
    bom: fc.boolean(),
    trailingNewline: fc.boolean(),
  })
  .map(({ mutations, quoting, newline, bom, trailingNewline }) => {
    const table = mutations.reduce(applyMutation, [HEADER, ...GOOD_ROWS.map((row) => [...row])]);
    const text = table.map((row) => row.map(quoting === 'proper' ? quoteCell : (cell) => cell).join(',')).join(newline);
    return `${bom ? '\uFEFF' : ''}${text}${trailingNewline ? newline : ''}`;
  });

/** Any string at all, also binary and long. */
const anyText = fc.oneof(fc.string({ unit: 'binary', maxLength: 300 }), fc.string({ maxLength: 2000 }));

const mapping = fc.oneof(
  { weight: 4, arbitrary: fc.constant(MAPPING) },
  {
    weight: 2,
    arbitrary: fc
      .tuple(fc.constantFrom(...IMPORT_FIELDS), fc.oneof(nastyCell, fc.constantFrom(...HEADER)))
      .map(([field, header]) => ({ ...MAPPING, [field]: header })),
  },
  { weight: 1, arbitrary: fc.dictionary(fc.oneof(fc.constantFrom(...IMPORT_FIELDS, '__proto__', 'constructor', ''), fc.string()), fc.oneof(nastyCell, fc.jsonValue({ maxDepth: 2 }))) },
  { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 3 }) },
);
const rateUnit = fc.oneof({ weight: 6, arbitrary: fc.constantFrom('fit', 'perHour', 'perYear') }, { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 2 }) });

/** A preview the server accepted must match the contract and be consistent with itself. */
function checkPreview(body: unknown): void {
  const preview = importPreview.parse(body);
  const counted = Object.values(preview.counts).reduce((sum, count) => sum + count, 0);
  expect(counted).toBe(preview.rows.length);
  for (const row of preview.rows) {
    const shown = JSON.stringify(row).slice(0, 300);
    if (row.outcome === 'invalid') {
      // Each faulty row says what is wrong.
      expect(row.errors.length, shown).toBeGreaterThan(0);
      for (const issue of row.errors) expect(issue.message.length, shown).toBeGreaterThan(0);
    } else {
      expect(row.errors, shown).toEqual([]);
      expect(row.fields, shown).not.toBeNull();
    }
  }
}

function send(path: string, body: unknown) {
  return agent.post(path).set('Content-Type', 'application/json').send(JSON.stringify(body) ?? 'null');
}

async function libraryCount(): Promise<number> {
  const response = await agent.get('/api/devices');
  expect(response.status).toBe(200);
  return deviceList.parse(response.body).length;
}

const SETTINGS = { seed: 10_2026, endOnFailure: true } as const;

describe('malformed device CSV imports', () => {
  it('preview: any body, broken file, mapping or unit gets a 4xx with a message or a preview naming each faulty row', async () => {
    let previews = 0;
    let faultyRows = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(
          { weight: 1, arbitrary: fc.jsonValue({ maxDepth: 4 }) },
          { weight: 1, arbitrary: fc.record({ csv: anyText, mapping, rateUnit }) },
          { weight: 5, arbitrary: fc.record({ csv: mutatedCsv, mapping, rateUnit }) },
        ),
        async (body) => {
          const response = await send('/api/devices/import/preview', body);
          if (response.status === 200) {
            previews += 1;
            checkPreview(response.body);
            faultyRows += (response.body as { counts: { invalid: number } }).counts.invalid;
          } else {
            expectRefusal(response.status, response.body);
          }
        },
      ),
      { ...SETTINGS, numRuns: 600 },
    );
    // Most mutated files still reach the preview (a broken row does not refuse the whole file).
    expect(previews).toBeGreaterThan(200);
    // And the mutations do break rows: the checks above met many faulty ones.
    expect(faultyRows).toBeGreaterThan(100);
  }, 120_000);

  it('confirm: a broken file is refused naming the rows, or imported with exactly the rows it counts', async () => {
    let imports = 0;
    let refused = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.record({ csv: mutatedCsv, mapping, rateUnit, skipInvalidRows: fc.boolean(), existingRecords: fc.constantFrom('new-version', 'skip') }),
        async (body) => {
          const before = await libraryCount();
          const response = await send('/api/devices/import/confirm', body);
          if (response.status !== 200) {
            refused += 1;
            expectRefusal(response.status, response.body);
            expect(await libraryCount()).toBe(before);
            return;
          }
          imports += 1;
          const result = importResult.parse(response.body);
          expect(await libraryCount()).toBe(before + result.created);
        },
      ),
      { ...SETTINGS, numRuns: 300 },
    );
    expect(imports).toBeGreaterThan(20);
    expect(refused).toBeGreaterThan(20);
  }, 120_000);

  it('a file over the row limit is refused as a whole with the reason, and a good file still imports afterwards', async () => {
    const many = [HEADER.join(','), ...Array.from({ length: 5001 }, (_, index) => `Maker ${index} (fictional),M-${index},valve,1,0,1,0,A,0,2,0.9,10,prior-use,R-${index},`)].join('\n');
    const tooMany = await send('/api/devices/import/preview', { csv: many, mapping: MAPPING, rateUnit: 'fit' });
    if (tooMany.status === 200) expect(importPreview.parse(tooMany.body).fileErrors.join(' ')).toMatch(/5000|rows/);
    else expectRefusal(tooMany.status, tooMany.body);

    const fresh = GOOD_ROWS.map((row) => [`${row[0]} spare`, ...row.slice(1)]);
    const good = await send('/api/devices/import/confirm', { csv: [HEADER, ...fresh].map((row) => row.join(',')).join('\n'), mapping: MAPPING, rateUnit: 'fit' });
    expect(good.status).toBe(200);
    expect(importResult.parse(good.body).created).toBe(3);
    expect((await agent.get('/api/health')).status).toBe(200);
  }, 60_000);
});
