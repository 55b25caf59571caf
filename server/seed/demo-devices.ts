import type { DeviceFields } from '../../shared/api/devices.js';
import type { Queryable } from '../db/client.js';
import { deviceRepository } from '../devices/device-repository.js';

/**
 * The demo device library: 30 invented devices from invented makers (every name here is fictional).
 * Figures are in FIT (1e-9 per hour) below, in the range such devices usually show in published generic
 * data (order of magnitude only, from memory; none is taken from a real data sheet).
 */
type Row = [
  maker: string,
  model: string,
  category: DeviceFields['category'],
  duFit: number,
  ddFit: number,
  suFit: number,
  sdFit: number,
  architectureType: 'A' | 'B',
  hardwareFaultTolerance: number,
  systematicCapability: number | null,
  proofTestCoverage: number | null,
  usefulLifeYears: number | null,
  sourceKind: DeviceFields['sourceKind'],
  sourceReference: string,
  validUntil: string | null,
];

const QUILLFEN = 'Quillfen Instruments (fictional)';
const ORRIN = 'Orrin Controls (fictional)';
const TARNBY = 'Tarnby Logic (fictional)';
const HARROW = 'Harrowmere Valveworks (fictional)';
const SELBY = 'Selbrook Actuation (fictional)';
const KESTREL = 'Kestrelby Relays (fictional)';
const HANDBOOK = 'Brackwater generic data handbook, ed. 3 (invented)';

const ROWS: readonly Row[] = [
  [QUILLFEN, 'QP-400 pressure transmitter', 'transmitter', 40, 360, 100, 200, 'B', 0, 2, 0.9, 15, 'assessment-report', 'QF-2026-014 (invented)', '2029-06-30'],
  [QUILLFEN, 'QP-410 differential pressure transmitter', 'transmitter', 45, 380, 110, 190, 'B', 0, 2, 0.9, 15, 'assessment-report', 'QF-2026-015 (invented)', '2029-06-30'],
  [QUILLFEN, 'QT-220 temperature transmitter with RTD', 'transmitter', 30, 270, 80, 150, 'B', 0, 2, 0.85, 15, 'assessment-report', 'QF-2025-102 (invented)', '2028-03-31'],
  [QUILLFEN, 'QL-700 guided-wave level transmitter', 'transmitter', 70, 480, 150, 250, 'B', 0, 2, 0.8, 12, 'assessment-report', 'QF-2025-140 (invented)', '2028-09-30'],
  [QUILLFEN, 'QF-90 vortex flow transmitter', 'transmitter', 90, 510, 200, 300, 'B', 0, 1, 0.75, 12, 'generic-handbook', `${HANDBOOK}, table 3.4`, null],
  [ORRIN, 'OS-12 pressure switch', 'switch', 150, 0, 250, 0, 'A', 0, 2, 0.95, 10, 'generic-handbook', `${HANDBOOK}, table 2.1`, null],
  [ORRIN, 'OS-30 float level switch', 'switch', 200, 0, 300, 0, 'A', 0, 2, 0.9, 10, 'prior-use', 'Brackwater Point prior-use record PU-17, 2016-2025 (invented)', '2027-12-31'],
  [ORRIN, 'OS-44 temperature switch', 'switch', 120, 0, 180, 0, 'A', 0, 1, 0.9, 10, 'generic-handbook', `${HANDBOOK}, table 2.3`, null],
  [ORRIN, 'OV-20 ball valve, 4 in.', 'valve', 350, 0, 200, 100, 'A', 0, 2, 0.8, 20, 'generic-handbook', `${HANDBOOK}, table 5.2`, null],
  [ORRIN, 'OV-25 ball valve, 8 in.', 'valve', 420, 0, 240, 120, 'A', 0, 2, 0.8, 20, 'generic-handbook', `${HANDBOOK}, table 5.2`, null],
  [HARROW, 'HV-100 triple-offset butterfly valve', 'valve', 300, 0, 180, 90, 'A', 0, 3, 0.85, 25, 'assessment-report', 'HVW-SR-0412 (invented)', '2030-01-31'],
  [HARROW, 'HV-140 globe control valve (trip duty)', 'valve', 500, 0, 350, 150, 'A', 0, 2, 0.7, 20, 'estimate', 'Engineering judgement, valve review 2026-04 (invented)', null],
  [HARROW, 'HV-200 axial-flow ESD valve', 'valve', 280, 0, 160, 80, 'A', 0, 3, 0.9, 25, 'assessment-report', 'HVW-SR-0500 (invented)', '2030-06-30'],
  [HARROW, 'HS-15 three-way solenoid valve', 'valve', 180, 20, 400, 100, 'A', 0, 3, 0.95, 10, 'assessment-report', 'HVW-SR-0333 (invented)', '2028-11-30'],
  [HARROW, 'HS-18 solenoid valve, redundant coils', 'valve', 90, 110, 450, 150, 'A', 1, 3, 0.95, 10, 'assessment-report', 'HVW-SR-0334 (invented)', '2028-11-30'],
  [SELBY, 'SA-60 spring-return pneumatic actuator', 'actuator', 220, 0, 300, 80, 'A', 0, 3, 0.9, 20, 'assessment-report', 'SBA-FM-2025-07 (invented)', '2029-02-28'],
  [SELBY, 'SA-90 double-acting pneumatic actuator', 'actuator', 320, 0, 250, 60, 'A', 0, 2, 0.85, 20, 'generic-handbook', `${HANDBOOK}, table 5.6`, null],
  [SELBY, 'SE-20 electric actuator, fail-safe module', 'actuator', 410, 190, 300, 200, 'B', 0, 2, 0.8, 15, 'assessment-report', 'SBA-FM-2024-19 (invented)', '2027-08-31'],
  [SELBY, 'SH-35 hydraulic actuator', 'actuator', 380, 0, 200, 120, 'A', 0, 2, 0.8, 20, 'prior-use', 'Brackwater Point prior-use record PU-22, 2014-2025 (invented)', '2027-12-31'],
  [SELBY, 'SP-5 partial-stroke test unit', 'actuator', 60, 140, 90, 60, 'B', 0, 2, null, 12, 'estimate', 'Vendor statement, not independently assessed (invented)', null],
  [TARNBY, 'TL-9 safety PLC, 1oo2D', 'logic-solver', 2, 498, 250, 250, 'B', 1, 3, 0.99, 10, 'assessment-report', 'TB-SR-77 (invented)', '2028-12-31'],
  [TARNBY, 'TL-5 compact safety controller', 'logic-solver', 8, 792, 300, 300, 'B', 0, 3, 0.99, 10, 'assessment-report', 'TB-SR-64 (invented)', '2028-06-30'],
  [TARNBY, 'TL-9 digital input card, 16 ch.', 'logic-solver', 1, 99, 50, 50, 'B', 0, 3, 0.99, 10, 'assessment-report', 'TB-SR-78 (invented)', '2028-12-31'],
  [TARNBY, 'TL-9 digital output card, 8 ch.', 'logic-solver', 2, 148, 70, 80, 'B', 0, 3, 0.99, 10, 'assessment-report', 'TB-SR-79 (invented)', '2028-12-31'],
  [TARNBY, 'TL-2 trip amplifier', 'logic-solver', 25, 175, 150, 100, 'B', 0, 2, 0.95, 12, 'generic-handbook', `${HANDBOOK}, table 4.1`, null],
  [TARNBY, 'TB-3 intrinsically safe barrier', 'other', 10, 0, 30, 20, 'A', 0, 2, 0.99, 15, 'generic-handbook', `${HANDBOOK}, table 4.5`, null],
  [KESTREL, 'KR-1 interposing relay, de-energise to trip', 'relay', 20, 0, 180, 0, 'A', 0, 3, 0.99, 15, 'assessment-report', 'KBR-CERT-118 (invented)', '2029-10-31'],
  [KESTREL, 'KR-4 force-guided safety relay', 'relay', 5, 45, 120, 30, 'A', 0, 3, 0.99, 15, 'assessment-report', 'KBR-CERT-121 (invented)', '2029-10-31'],
  [KESTREL, 'KR-7 timer relay', 'relay', 40, 0, 110, 0, 'A', 0, 2, 0.95, 12, 'generic-handbook', `${HANDBOOK}, table 4.3`, null],
  [KESTREL, 'KM-2 motor contactor (trip path)', 'relay', 110, 0, 400, 0, 'A', 0, 2, 0.9, 10, 'prior-use', 'Brackwater Point prior-use record PU-31, 2018-2025 (invented)', '2027-12-31'],
];

const FIT = 1e-9;

export const DEMO_DEVICES: readonly DeviceFields[] = ROWS.map((row) => ({
  maker: row[0],
  model: row[1],
  category: row[2],
  description: 'Demo data, invented.',
  lambdaDU: row[3] * FIT,
  lambdaDD: row[4] * FIT,
  lambdaSU: row[5] * FIT,
  lambdaSD: row[6] * FIT,
  architectureType: row[7],
  hardwareFaultTolerance: row[8],
  systematicCapability: row[9],
  proofTestCoverage: row[10],
  usefulLifeYears: row[11],
  sourceKind: row[12],
  sourceReference: row[13],
  validUntil: row[14],
}));

/** Inserts the demo library (version 1 of each record), written by `authorId`. */
export async function seedDemoDevices(tx: Queryable, authorId: string): Promise<void> {
  const repository = deviceRepository(tx);
  for (const fields of DEMO_DEVICES) {
    await repository.insertDevice({ fields, changeNote: 'Demo library (invented figures)', userId: authorId });
  }
}
