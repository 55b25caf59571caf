import type { DeviceCategory, DeviceSourceKind, ImportField, ImportRateUnit, ImportRowOutcome } from '../../../shared/api/devices.js';

export const CATEGORY_LABELS: Record<DeviceCategory, string> = {
  transmitter: 'Transmitter',
  switch: 'Switch',
  'logic-solver': 'Logic solver',
  valve: 'Valve',
  actuator: 'Actuator',
  relay: 'Relay',
  other: 'Other',
};

export const SOURCE_KIND_LABELS: Record<DeviceSourceKind, string> = {
  'assessment-report': 'Assessment report',
  'generic-handbook': 'Generic handbook',
  'prior-use': 'Prior use',
  estimate: 'Estimate',
};

export const RATE_UNIT_LABELS: Record<ImportRateUnit, string> = { perHour: 'per hour', fit: 'FIT (1e-9 /h)', perYear: 'per year' };

export const IMPORT_FIELD_LABELS: Record<ImportField, string> = {
  maker: 'Maker',
  model: 'Model',
  category: 'Category',
  description: 'Description',
  lambdaDU: 'λDU',
  lambdaDD: 'λDD',
  lambdaSU: 'λSU',
  lambdaSD: 'λSD',
  architectureType: 'Type A/B',
  hardwareFaultTolerance: 'HFT',
  systematicCapability: 'SC',
  proofTestCoverage: 'Proof-test coverage',
  usefulLifeYears: 'Useful life (years)',
  sourceKind: 'Source kind',
  sourceReference: 'Source reference',
  validUntil: 'Valid until',
};

export const OUTCOME_LABELS: Record<ImportRowOutcome, string> = {
  new: 'New record',
  'new-version': 'New version of a record',
  unchanged: 'Same as the library (skipped)',
  'duplicate-in-file': 'Duplicate in the file (skipped)',
  invalid: 'Has errors',
};
