import type { DeviceSummary } from '../../../shared/api/devices.js';
import { isProbabilityEvent, type LinkedEventField, type RateEvent } from '../../../shared/model-file.js';
import type { EditableModel } from '../canvas/model-graph';
import { updateLink } from './device-link';

/**
 * The events of a model that link to an older library version than the record's current one, and the
 * update that moves them on (devices/device-link.ts updateLink: overridden fields keep their value and
 * reason). Pure functions over the model being edited.
 */

/** The library records the model's events link to, sorted, each once. */
export function linkedDeviceIds(model: EditableModel): string[] {
  if (model.kind !== 'fault-tree') return [];
  const ids = new Set<string>();
  for (const event of model.events) if (!isProbabilityEvent(event) && event.device) ids.add(event.device.id);
  return [...ids].sort();
}

export interface OutdatedEvent {
  readonly eventId: string;
  readonly label: string | null;
  readonly linkedVersion: number;
  readonly current: DeviceSummary;
  /** Fields the event overrides: the update keeps their values and reasons. */
  readonly overriddenFields: readonly LinkedEventField[];
}

/** The linked events whose record has a newer current version, in the model's event order. */
export function outdatedEvents(model: EditableModel, currents: ReadonlyMap<string, DeviceSummary>): OutdatedEvent[] {
  if (model.kind !== 'fault-tree') return [];
  return model.events.flatMap((event): OutdatedEvent[] => {
    if (isProbabilityEvent(event) || !event.device) return [];
    const current = currents.get(event.device.id);
    if (!current || current.version <= event.device.version) return [];
    return [
      {
        eventId: event.id,
        label: event.label ?? null,
        linkedVersion: event.device.version,
        current,
        overriddenFields: (event.device.overrides ?? []).map((item) => item.field),
      },
    ];
  });
}

/** The model with the named outdated events (all of them when no ids are given) linked to the current versions. */
export function updateOutdated(model: EditableModel, currents: ReadonlyMap<string, DeviceSummary>, eventIds?: readonly string[]): EditableModel {
  if (model.kind !== 'fault-tree') return model;
  const chosen = new Set(outdatedEvents(model, currents).map((item) => item.eventId).filter((id) => !eventIds || eventIds.includes(id)));
  if (chosen.size === 0) return model;
  return {
    ...model,
    events: model.events.map((event) => (chosen.has(event.id) ? updateLink(event as RateEvent, currents.get((event as RateEvent).device!.id)!) : event)),
  };
}
