import type { FaultTreeModel, RateEvent } from '../../../shared/model-file.js';
import { eventValue, linkEvent, overrideField } from '../devices/device-link';
import type { SubsystemLink } from './wizard-form';

/**
 * Links the channel events of the generated fault tree to the library versions the wizard's subsystems
 * were linked to, exactly as a pick on the canvas links an event (devices/device-link.ts): the linked
 * fields take the version's values and a value typed differently in the wizard is kept as an override
 * with its reason. The channel events of group G are the inputs of G's voting gate; a 1oo2D channel
 * enters through an OR gate whose first input is the channel event (the second, its safe-detected
 * take-out, has no device figures of its own and stays unlinked).
 */
export function linkGeneratedEvents(faultTree: FaultTreeModel, links: ReadonlyMap<string, SubsystemLink>): FaultTreeModel {
  if (links.size === 0) return faultTree;
  const gates = new Map(faultTree.gates.map((gate) => [gate.id, gate]));
  const eventIds = new Set(faultTree.events.map((event) => event.id));
  const linkOf = new Map<string, SubsystemLink>();
  for (const [groupId, link] of links) {
    const voting = gates.get(groupId);
    if (!voting) throw new Error(`the generated fault tree has no gate for subsystem "${groupId}"`);
    for (const input of voting.inputs) {
      const channel = eventIds.has(input) ? input : gates.get(input)?.inputs[0];
      if (channel !== undefined && eventIds.has(channel)) linkOf.set(channel, link);
    }
  }
  return {
    ...faultTree,
    events: faultTree.events.map((event) => {
      const link = linkOf.get(event.id);
      return link && !('probability' in event) ? linkedChannel(event, link) : event;
    }),
  };
}

function linkedChannel(generated: RateEvent, link: SubsystemLink): RateEvent {
  let event = linkEvent(generated, link.version);
  for (const { field, reason } of link.overrides) {
    const change = overrideField(event, field, eventValue(generated, field) ?? 0, reason);
    if (!change.ok) throw new Error(change.message);
    event = change.event;
  }
  return event;
}
