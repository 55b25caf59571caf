import { z } from 'zod';
import { deviceFields, type DeviceFields, type DeviceSummary, type DeviceVersion } from '../../../shared/api/devices.js';

/** An invented library version for specs (fictional maker; rates per hour). */
export function deviceVersionFixture(overrides: Partial<DeviceVersion> = {}): DeviceVersion {
  return {
    deviceId: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a01',
    version: 1,
    maker: 'Quillfen Instruments (fictional)',
    model: 'QP-400 pressure transmitter',
    category: 'transmitter',
    description: '',
    lambdaDU: 4e-8,
    lambdaDD: 3.6e-7,
    lambdaSU: 1e-7,
    lambdaSD: 2e-7,
    diagnosticCoverage: 0.9,
    safeFailureFraction: 6.6 / 7,
    architectureType: 'B',
    hardwareFaultTolerance: 0,
    systematicCapability: 2,
    proofTestCoverage: 0.9,
    usefulLifeYears: 15,
    sourceKind: 'assessment-report',
    sourceReference: 'QF-2026-014 (invented)',
    validUntil: '2029-06-30',
    changeNote: 'first version',
    createdAt: '2026-12-01T10:00:00.000Z',
    createdById: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a02',
    createdByDisplayName: 'Ezra Engineer (demo)',
    ...overrides,
  };
}

export function deviceSummaryFixture(overrides: Partial<DeviceSummary> = {}): DeviceSummary {
  const version = deviceVersionFixture(overrides);
  return { ...version, id: version.deviceId, evidenceCount: 0, archivedAt: null, ...overrides };
}

/** The entered figures of the fixture version (what an import row parses to). */
export function deviceFieldsFixture(): DeviceFields {
  return z.object(deviceFields.shape).parse(deviceVersionFixture());
}
