import {
  deviceFields,
  type DeviceFields,
  type DeviceVersion,
} from '../../../shared/api/devices.js';
import type { ValidationIssue } from '../../../shared/api/errors.js';
import { formatTyped, rateFromPerHour, rateToPerHour, readTypedNumber, type RateUnit } from '../units/units';

/**
 * The record editor's form as the user typed it (numbers as text, rates in the chosen unit), and the
 * conversions to and from the API's fields (rates per hour). Kept as text so nothing typed is lost.
 */
export interface DeviceFormValue {
  maker: string;
  model: string;
  category: DeviceFields['category'];
  description: string;
  lambdaDU: string;
  lambdaDD: string;
  lambdaSU: string;
  lambdaSD: string;
  architectureType: DeviceFields['architectureType'];
  hardwareFaultTolerance: string;
  systematicCapability: string;
  proofTestCoverage: string;
  usefulLifeYears: string;
  sourceKind: DeviceFields['sourceKind'];
  sourceReference: string;
  validUntil: string;
}

const RATES = ['lambdaDU', 'lambdaDD', 'lambdaSU', 'lambdaSD'] as const;

export function emptyDeviceForm(): DeviceFormValue {
  return {
    maker: '',
    model: '',
    category: 'transmitter',
    description: '',
    lambdaDU: '',
    lambdaDD: '0',
    lambdaSU: '0',
    lambdaSD: '0',
    architectureType: 'B',
    hardwareFaultTolerance: '0',
    systematicCapability: '',
    proofTestCoverage: '',
    usefulLifeYears: '',
    sourceKind: 'assessment-report',
    sourceReference: '',
    validUntil: '',
  };
}

export function toDeviceForm(version: DeviceVersion, unit: RateUnit): DeviceFormValue {
  const optional = (value: number | null) => (value === null ? '' : formatTyped(value));
  return {
    maker: version.maker,
    model: version.model,
    category: version.category,
    description: version.description,
    lambdaDU: formatTyped(rateFromPerHour(version.lambdaDU, unit)),
    lambdaDD: formatTyped(rateFromPerHour(version.lambdaDD, unit)),
    lambdaSU: formatTyped(rateFromPerHour(version.lambdaSU, unit)),
    lambdaSD: formatTyped(rateFromPerHour(version.lambdaSD, unit)),
    architectureType: version.architectureType,
    hardwareFaultTolerance: String(version.hardwareFaultTolerance),
    systematicCapability: optional(version.systematicCapability),
    proofTestCoverage: optional(version.proofTestCoverage),
    usefulLifeYears: optional(version.usefulLifeYears),
    sourceKind: version.sourceKind,
    sourceReference: version.sourceReference,
    validUntil: version.validUntil ?? '',
  };
}

/** Re-expresses the typed rates in another unit (a rate that is not a number stays as typed). */
export function convertRates(value: DeviceFormValue, from: RateUnit, to: RateUnit): DeviceFormValue {
  const next = { ...value };
  for (const field of RATES) {
    const typed = readTypedNumber(value[field]);
    if (typed !== null && !Number.isNaN(typed)) next[field] = formatTyped(rateFromPerHour(rateToPerHour(typed, from), to));
  }
  return next;
}

export type DeviceFormResult = { ok: true; fields: DeviceFields } | { ok: false; issues: ValidationIssue[] };

/** The API fields of the form, or every field at fault (paths are the field names). */
export function fromDeviceForm(value: DeviceFormValue, unit: RateUnit): DeviceFormResult {
  const issues: ValidationIssue[] = [];
  const number = (field: keyof DeviceFormValue, optional: boolean): number | null | undefined => {
    const typed = readTypedNumber(value[field]);
    if (typed === null) {
      if (!optional) issues.push({ path: field, message: 'is required' });
      return null;
    }
    if (Number.isNaN(typed)) {
      issues.push({ path: field, message: `"${value[field]}" is not a number` });
      return undefined;
    }
    return typed;
  };
  const candidate: Record<string, unknown> = {
    maker: value.maker,
    model: value.model,
    category: value.category,
    description: value.description,
    architectureType: value.architectureType,
    sourceKind: value.sourceKind,
    sourceReference: value.sourceReference,
    validUntil: value.validUntil.trim() === '' ? null : value.validUntil.trim(),
    hardwareFaultTolerance: number('hardwareFaultTolerance', false),
    systematicCapability: number('systematicCapability', true),
    proofTestCoverage: number('proofTestCoverage', true),
    usefulLifeYears: number('usefulLifeYears', true),
  };
  for (const field of RATES) {
    const typed = number(field, false);
    candidate[field] = typeof typed === 'number' ? rateToPerHour(typed, unit) : typed;
  }
  const parsed = deviceFields.safeParse(candidate);
  if (!parsed.success) {
    const known = new Set(issues.map((issue) => issue.path));
    for (const issue of parsed.error.issues) {
      const path = issue.path.map(String).join('.');
      if (!known.has(path)) issues.push({ path, message: issue.message });
    }
  }
  return issues.length === 0 && parsed.success ? { ok: true, fields: parsed.data } : { ok: false, issues };
}
