import type { DeviceVersion } from '../../../shared/api/devices.js';
import { LINKED_EVENT_FIELDS, type DeviceLink, type LinkedEventField, type RateEvent } from '../../../shared/model-file.js';

/**
 * Linking a model's rate event to a device-library version (shared/model-file.ts `device`): the linked
 * fields take the version's values; an override keeps a different value with its reason; a newer library
 * version is offered, never applied by itself. Pure functions: each returns a new event.
 */

type LinkedValue = number | 'A' | 'B';

export const LINKED_FIELD_LABELS: Record<LinkedEventField, string> = {
  lambdaDU: 'λDU',
  lambdaDD: 'λDD',
  lambdaS: 'λS (λSU + λSD)',
  deviceType: 'Device type',
  systematicCapability: 'Systematic capability',
  'proofTest.coverage': 'Proof-test coverage',
};

/** The value a library version gives each linked field (undefined: the version has none). */
export function libraryValues(version: DeviceVersion): Record<LinkedEventField, LinkedValue | undefined> {
  return {
    lambdaDU: version.lambdaDU,
    lambdaDD: version.lambdaDD,
    lambdaS: version.lambdaSU + version.lambdaSD,
    deviceType: version.architectureType,
    systematicCapability: version.systematicCapability ?? undefined,
    'proofTest.coverage': version.proofTestCoverage ?? undefined,
  };
}

export function eventValue(event: RateEvent, field: LinkedEventField): LinkedValue | undefined {
  return field === 'proofTest.coverage' ? event.proofTest?.coverage : event[field];
}

function withValue(event: RateEvent, field: LinkedEventField, value: LinkedValue | undefined): RateEvent {
  if (field === 'proofTest.coverage') {
    if (!event.proofTest) return event;
    const proofTest = { ...event.proofTest };
    if (value === undefined) delete proofTest.coverage;
    else proofTest.coverage = value as number;
    return { ...event, proofTest };
  }
  const next = { ...event } as Record<string, unknown>;
  if (value === undefined) delete next[field];
  else next[field] = value;
  return next as RateEvent;
}

/** Equal as stored figures: rates to 1e-12 relative (what a unit round trip can change), others exactly. */
export function sameValue(a: LinkedValue | undefined, b: LinkedValue | undefined): boolean {
  if (typeof a === 'number' && typeof b === 'number') return a === b || Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));
  return a === b;
}

/** Whether the field applies to this event (a proof-test coverage needs a proof test). */
function applies(event: RateEvent, field: LinkedEventField): boolean {
  return field !== 'proofTest.coverage' || event.proofTest !== undefined;
}

function describeSource(version: DeviceVersion): string {
  return `${version.maker} ${version.model}, library version ${version.version}: ${version.sourceReference}`.slice(0, 500);
}

/** Links the event to `version`: every linked field takes the library value, earlier overrides are dropped. */
export function linkEvent(event: RateEvent, version: DeviceVersion): RateEvent {
  const values = libraryValues(version);
  let next: RateEvent = { ...event, device: { id: version.deviceId, version: version.version }, source: describeSource(version) };
  for (const field of LINKED_EVENT_FIELDS) next = withValue(next, field, values[field]);
  return next;
}

/** linked: holds the library value; overridden: differs on purpose (with reason); unexplained: differs with no reason. */
export type LinkedFieldStatus = 'linked' | 'overridden' | 'unexplained';

export interface LinkedFieldState {
  readonly field: LinkedEventField;
  readonly status: LinkedFieldStatus;
  readonly libraryValue: LinkedValue | undefined;
  readonly eventValue: LinkedValue | undefined;
  readonly reason: string | null;
}

/** The state of each linked field of a linked event against the version it links to. */
export function linkedFieldStates(event: RateEvent, version: DeviceVersion): LinkedFieldState[] {
  const values = libraryValues(version);
  const overrides = new Map((event.device?.overrides ?? []).map((item) => [item.field, item.reason]));
  return LINKED_EVENT_FIELDS.filter((field) => applies(event, field)).map((field) => {
    const current = eventValue(event, field);
    const reason = overrides.get(field) ?? null;
    const status: LinkedFieldStatus = reason !== null ? 'overridden' : sameValue(current, values[field]) ? 'linked' : 'unexplained';
    return { field, status, libraryValue: values[field], eventValue: current, reason };
  });
}

export type LinkChange = { ok: true; event: RateEvent } | { ok: false; message: string };

/** Gives a linked field its own value; the reason is required and kept beside the link. */
export function overrideField(event: RateEvent, field: LinkedEventField, value: LinkedValue, reason: string): LinkChange {
  if (!event.device) return { ok: false, message: 'the event is not linked to a library record' };
  const trimmed = reason.trim();
  if (trimmed === '') return { ok: false, message: `an override of ${LINKED_FIELD_LABELS[field]} needs a reason` };
  if (trimmed.length > 500) return { ok: false, message: 'the reason must have at most 500 characters' };
  const overrides = [...(event.device.overrides ?? []).filter((item) => item.field !== field), { field, reason: trimmed }];
  return { ok: true, event: { ...withValue(event, field, value), device: { ...event.device, overrides } } };
}

/** Puts the library value back into an overridden field and drops its override. */
export function restoreField(event: RateEvent, field: LinkedEventField, version: DeviceVersion): RateEvent {
  if (!event.device) return event;
  const overrides = (event.device.overrides ?? []).filter((item) => item.field !== field);
  const device: DeviceLink = { id: event.device.id, version: event.device.version, ...(overrides.length > 0 ? { overrides } : {}) };
  return { ...withValue(event, field, libraryValues(version)[field]), device };
}

/** Whether the library has a newer version than the one the event links to. */
export function newerVersionAvailable(link: DeviceLink | undefined, current: Pick<DeviceVersion, 'deviceId' | 'version'> | undefined): boolean {
  return link !== undefined && current !== undefined && current.deviceId === link.id && current.version > link.version;
}

/**
 * Moves the link to `version`: fields that held the library value take the new one; overridden fields
 * keep their value and reason (the engineer decided on them; the update does not undo that).
 */
export function updateLink(event: RateEvent, version: DeviceVersion): RateEvent {
  if (!event.device || event.device.id !== version.deviceId) return event;
  const overridden = new Set((event.device.overrides ?? []).map((item) => item.field));
  const values = libraryValues(version);
  let next: RateEvent = { ...event, device: { ...event.device, version: version.version }, source: describeSource(version) };
  for (const field of LINKED_EVENT_FIELDS) if (!overridden.has(field)) next = withValue(next, field, values[field]);
  return next;
}

/** Removes the link; the values stay as they are, now the event's own. */
export function unlinkEvent(event: RateEvent): RateEvent {
  const next = { ...event };
  delete next.device;
  return next;
}
