import type { Express } from 'express';
import Papa from 'papaparse';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { deviceList, importPreview, importResult } from '../../shared/api/devices.js';
import { transmitterFields } from './devices-helpers.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld } from './helpers/world.js';

let database: TestDatabase;
let app: Express;

beforeAll(async () => {
  database = await openTestDatabase();
  app = createTestApp(database);
});

afterAll(async () => {
  await database.close();
});

beforeEach(async () => {
  await resetDatabase(database.db);
  await seedWorld(database.db);
});

const HEADER = 'Maker,Type,Kind,LDU,LDD,LSU,LSD,Arch,HFT,SC,PTC,Life,Source,Reference,Valid';
const MAPPING = {
  maker: 'Maker',
  model: 'Type',
  category: 'Kind',
  lambdaDU: 'LDU',
  lambdaDD: 'LDD',
  lambdaSU: 'LSU',
  lambdaSD: 'LSD',
  architectureType: 'Arch',
  hardwareFaultTolerance: 'HFT',
  systematicCapability: 'SC',
  proofTestCoverage: 'PTC',
  usefulLifeYears: 'Life',
  sourceKind: 'Source',
  sourceReference: 'Reference',
  validUntil: 'Valid',
};

/** Three invented devices with rates in FIT (1 FIT = 1e-9 per hour, common practice). */
const GOOD_FIT_CSV = [
  HEADER,
  'Orrin Controls (fictional),OV-20 ball valve,valve,350,0,200,100,A,0,2,80%,20,generic handbook,Handbook table 4.2 (invented),',
  'Orrin Controls (fictional),OA-5 actuator,actuator,120,0,300,0,A,0,,0.9,20,prior-use,Site records 2019-2025 (invented),2030-01-01',
  'Tarnby Logic (fictional),TL-9 safety PLC,logic solver,1.5,498.5,250,250,B,1,3,0.99,10,Assessment report,TB-SR-77 (invented),2028-12-31',
].join('\n');

async function preview(csv: string, rateUnit = 'fit', mapping: Record<string, string> = MAPPING) {
  const agent = await signedInAgent(app, 'engineer');
  const response = await agent.post('/api/devices/import/preview').send({ csv, mapping, rateUnit });
  return { agent, response };
}

describe('device CSV import', () => {
  it('previews a good file with mapped columns and converted units, writes nothing, then imports on confirm', async () => {
    const { agent, response } = await preview(GOOD_FIT_CSV);
    expect(response.status).toBe(200);
    const result = importPreview.parse(response.body);
    expect(result.fileErrors).toEqual([]);
    expect(result.rows.map((row) => [row.line, row.outcome, row.errors])).toEqual([
      [2, 'new', []],
      [3, 'new', []],
      [4, 'new', []],
    ]);
    // 350 FIT = 3.5e-7 per hour; "80%" = 0.8; "logic solver" = logic-solver (tolerance 1e-20 on rates).
    const valve = result.rows[0]!.fields!;
    expect(valve.lambdaDU).toBeCloseTo(3.5e-7, 20);
    expect(valve.proofTestCoverage).toBe(0.8);
    expect(valve.validUntil).toBeNull();
    expect(result.rows[2]!.fields!.category).toBe('logic-solver');
    expect(result.rows[2]!.fields!.sourceKind).toBe('assessment-report');
    expect(result.counts).toMatchObject({ new: 3, invalid: 0 });
    expect(deviceList.parse((await agent.get('/api/devices')).body)).toEqual([]);

    const confirmed = await agent.post('/api/devices/import/confirm').send({ csv: GOOD_FIT_CSV, mapping: MAPPING, rateUnit: 'fit' });
    expect(confirmed.status).toBe(200);
    expect(importResult.parse(confirmed.body)).toEqual({ created: 3, newVersions: 0, skipped: 0 });
    const list = deviceList.parse((await agent.get('/api/devices')).body);
    expect(list.map((item) => item.model)).toEqual(['OA-5 actuator', 'OV-20 ball valve', 'TL-9 safety PLC']);
    expect(list.every((item) => item.version === 1 && item.changeNote === 'CSV import by Engineer (test)')).toBe(true);
  });

  it('names each bad cell by line and field, and refuses to confirm while rows are invalid', async () => {
    const csv = [
      HEADER,
      'Orrin Controls (fictional),OV-20 ball valve,valve,350,0,200,100,A,0,2,0.8,20,generic-handbook,Handbook (invented),',
      ',OV-21,pump,abc,0,200,100,C,0,7,1.5,20,rumour,,31/12/2030',
    ].join('\n');
    const { agent, response } = await preview(csv);
    const result = importPreview.parse(response.body);
    const bad = result.rows[1]!;
    expect(bad).toMatchObject({ line: 3, outcome: 'invalid', fields: null });
    const paths = bad.errors.map((error) => error.path).sort();
    expect(paths).toEqual(
      ['architectureType', 'category', 'lambdaDU', 'maker', 'proofTestCoverage', 'sourceKind', 'sourceReference', 'systematicCapability', 'validUntil'].sort(),
    );
    expect(bad.errors.find((error) => error.path === 'lambdaDU')!.message).toBe('"abc" is not a number');
    expect(bad.cells.lambdaDU).toBe('abc');

    const refused = await agent.post('/api/devices/import/confirm').send({ csv, mapping: MAPPING, rateUnit: 'fit' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.issues.map((issue: { path: string }) => issue.path)).toContain('line 3.lambdaDU');
    expect(deviceList.parse((await agent.get('/api/devices')).body)).toEqual([]);

    const skipping = await agent.post('/api/devices/import/confirm').send({ csv, mapping: MAPPING, rateUnit: 'fit', skipInvalidRows: true });
    expect(importResult.parse(skipping.body)).toEqual({ created: 1, newVersions: 0, skipped: 1 });
  });

  it('flags rates that only make sense in another unit', async () => {
    // The good file's figures are FIT; read as per hour, 350 /h is far above any device (limit 1e-2 /h).
    const asPerHour = importPreview.parse((await preview(GOOD_FIT_CSV, 'perHour')).response.body);
    expect(asPerHour.rows.every((row) => row.outcome === 'invalid')).toBe(true);
    expect(asPerHour.rows[0]!.errors.find((error) => error.path === 'lambdaDU')!.message).toMatch(/350 per hour is 3\.50e\+2 per hour.*is the unit right\?/);

    // A per-hour rate of 4e-8 read as FIT is 4e-17 /h, below the smallest plausible 1e-12 /h: refused.
    const perHourCsv = [HEADER, 'Q (fictional),QP-1,transmitter,4e-8,3.6e-7,1e-7,2e-7,B,0,2,0.9,15,estimate,Invented,'].join('\n');
    const asFit = importPreview.parse((await preview(perHourCsv, 'fit')).response.body);
    expect(asFit.rows[0]!.outcome).toBe('invalid');
    expect(asFit.rows[0]!.errors.map((error) => error.path).sort()).toEqual(['lambdaDD', 'lambdaDU', 'lambdaSD', 'lambdaSU']);
    const asHour = importPreview.parse((await preview(perHourCsv, 'perHour')).response.body);
    expect(asHour.rows[0]!.outcome).toBe('new');
  });

  it('flags duplicates in the file and rows matching library records, importing changed ones as new versions', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    const existing = await engineer.post('/api/devices').send(
      transmitterFields({ maker: 'Orrin Controls (fictional)', model: 'OV-20 ball valve', category: 'valve', lambdaDU: 3.5e-7, lambdaDD: 0, lambdaSU: 2e-7, lambdaSD: 1e-7, architectureType: 'A', systematicCapability: 2, proofTestCoverage: 0.8, usefulLifeYears: 20, sourceKind: 'generic-handbook', sourceReference: 'Handbook table 4.2 (invented)', validUntil: null, description: '' }),
    );
    expect(existing.status).toBe(201);
    const other = await engineer.post('/api/devices').send(transmitterFields({ maker: 'Tarnby Logic (fictional)', model: 'TL-9 safety PLC' }));
    const csv = [GOOD_FIT_CSV, 'orrin controls (FICTIONAL),ov-20 BALL VALVE,valve,999,0,1,1,A,0,2,0.8,20,estimate,Duplicate line (invented),'].join('\n');
    const result = importPreview.parse((await preview(csv)).response.body);
    expect(result.rows.map((row) => row.outcome)).toEqual(['unchanged', 'new', 'new-version', 'duplicate-in-file']);
    expect(result.rows[0]!.existing).toEqual({ id: existing.body.id, version: 1 });
    expect(result.rows[2]!.existing).toEqual({ id: other.body.id, version: 1 });
    expect(result.rows[3]!.duplicateOfLine).toBe(2);

    const confirmed = await engineer.post('/api/devices/import/confirm').send({ csv, mapping: MAPPING, rateUnit: 'fit' });
    expect(importResult.parse(confirmed.body)).toEqual({ created: 1, newVersions: 1, skipped: 2 });
    const plc = deviceList.parse((await engineer.get('/api/devices').query({ ids: other.body.id })).body)[0]!;
    expect(plc.version).toBe(2);
    expect(plc.lambdaDU).toBeCloseTo(1.5e-9, 20);
  });

  it('reports a mapped column the file lacks, and a reviewer may not import', async () => {
    const missing = importPreview.parse((await preview(GOOD_FIT_CSV, 'fit', { ...MAPPING, lambdaDU: 'Lambda DU [FIT]' })).response.body);
    expect(missing.fileErrors).toEqual(['lambdaDU is mapped to column "Lambda DU [FIT]", which the file does not have']);
    expect(missing.rows[0]!.errors).toContainEqual({ path: 'lambdaDU', message: 'has no column in the file (map one)' });

    const reviewer = await signedInAgent(app, 'reviewer');
    const refused = await reviewer.post('/api/devices/import/preview').send({ csv: GOOD_FIT_CSV, mapping: MAPPING, rateUnit: 'fit' });
    expect(refused.status).toBe(403);
    // The right to import is checked before the body: a reviewer is refused whatever they send.
    expect((await reviewer.post('/api/devices/import/preview').send({ csv: GOOD_FIT_CSV, rateUnit: 'per-fortnight' })).status).toBe(403);
    const engineer = await signedInAgent(app, 'engineer');
    const badUnit = await engineer.post('/api/devices/import/preview').send({ csv: GOOD_FIT_CSV, rateUnit: 'per-fortnight' });
    expect(badUnit.status).toBe(400);
    expect(badUnit.body.error.details.issues[0]).toEqual({ path: 'rateUnit', message: 'must be perHour, fit or perYear' });
  });
});

describe('device CSV export', () => {
  it('escapes cells a spreadsheet would run as a formula, and the file imports back unchanged', async () => {
    const engineer = await signedInAgent(app, 'engineer');
    await engineer.post('/api/devices').send(transmitterFields({ model: '=HYPERLINK("http://example.invalid","x")', description: '+1 spare; @risk' }));
    const exported = await engineer.get('/api/devices/export');
    expect(exported.status).toBe(200);
    expect(exported.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(exported.headers['content-disposition']).toMatch(/^attachment; filename="?device-library-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const text = exported.text.replace(/^\uFEFF/, '');
    const rows = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;
    expect(rows).toHaveLength(1);
    // OWASP "CSV injection": a cell starting with = + - @ gets a leading apostrophe.
    expect(rows[0]!['model']).toBe('\'=HYPERLINK("http://example.invalid","x")');
    expect(rows[0]!['description']).toBe("'+1 spare; @risk");
    expect(Number(rows[0]!['lambdaDU'])).toBe(4.0e-8);

    const again = importPreview.parse((await engineer.post('/api/devices/import/preview').send({ csv: text, rateUnit: 'perHour' })).body);
    expect(again.rows.map((row) => row.outcome)).toEqual(['unchanged']);
  });
});
