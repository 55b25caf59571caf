import { ErrorHandler } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { ModelDetail, ModelDraft } from '../../../shared/api/models.js';
import type { EditableModel, FaultTreeDraft } from '../canvas/model-graph';
import { ApiError } from '../errors/api-error';
import { AUTOSAVE_DELAY_MS, DraftStore, RETRY_DELAY_MS } from './draft-store';
import { ModelRecords } from './model-records';

const PROJECT = '00000000-0000-4000-8000-000000000001';
const MODEL = '00000000-0000-4000-8000-000000000002';
const USER = '00000000-0000-4000-8000-000000000003';

/** An invented two-channel pressure trip, as stored (version 3). */
const stored: FaultTreeDraft = {
  format: 'proofline/model',
  version: 1,
  name: 'Invented separator pressure trip',
  kind: 'fault-tree',
  mission: { hours: 87_600, demand: 'low' },
  layout: {},
  events: [
    { id: 'PT-1', lambdaDU: 2e-7, proofTest: { intervalHours: 8760 } },
    { id: 'PT-2', lambdaDU: 2e-7, proofTest: { intervalHours: 8760 } },
  ],
  gates: [{ id: 'TOP', type: 'and', inputs: ['PT-1', 'PT-2'] }],
  ccf: [],
  top: 'TOP',
};

/** The draft with the first event's label set to `label` (one edit as the properties panel makes it). */
function labelled(model: EditableModel, label: string): EditableModel {
  const tree = model as FaultTreeDraft;
  return { ...tree, events: tree.events.map((event, index) => (index === 0 ? { ...event, label } : event)) };
}

/** The same JSON with every object's keys in reverse order, as PostgreSQL jsonb may hand it back. */
function reordered(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reordered);
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(
      Object.entries(value as Record<string, unknown>)
        .reverse()
        .map(([key, item]) => [key, reordered(item)]),
    );
  }
  return value;
}

function draft(version: number, content: unknown, by = 'Dana Field'): ModelDraft {
  return { version, content: content as Record<string, unknown>, issues: [], updatedAt: '2025-03-01T10:00:00.000Z', updatedById: USER, updatedByDisplayName: by };
}

function detail(version: number, content: unknown = stored): ModelDetail {
  return {
    id: MODEL,
    projectId: PROJECT,
    sifId: '00000000-0000-4000-8000-000000000004',
    name: stored.name,
    kind: 'fault-tree',
    draftVersion: version,
    latestRevision: null,
    createdAt: '2025-03-01T09:00:00.000Z',
    createdById: USER,
    updatedAt: '2025-03-01T10:00:00.000Z',
    draft: draft(version, content),
  };
}

interface SaveCall {
  readonly version: number;
  readonly content: EditableModel;
  resolve(answer: ModelDraft): void;
  reject(error: unknown): void;
}

/** ModelRecords with saves the test answers by hand, in the order they were sent. */
class FakeRecords {
  readonly saves: SaveCall[] = [];

  saveDraft(_projectId: string, _modelId: string, version: number, content: Record<string, unknown>): Promise<ModelDraft> {
    return new Promise((resolve, reject) => this.saves.push({ version, content: content as unknown as EditableModel, resolve, reject }));
  }
}

const offline = (): ApiError => new ApiError(0, 'network_error', 'The Proofline server could not be reached. Check the connection and try again.', null);
const conflict = (current: ModelDraft): ApiError => new ApiError(409, 'version_conflict', 'the draft was saved by someone else', { current });
const localCopy = (): { baseVersion: number; content: EditableModel } | null => {
  const text = localStorage.getItem(`proofline.draft.${MODEL}`);
  return text ? (JSON.parse(text) as { baseVersion: number; content: EditableModel }) : null;
};

describe('DraftStore (autosave)', () => {
  let records: FakeRecords;
  let reported: unknown[];

  function makeStore(): DraftStore {
    return TestBed.inject(DraftStore);
  }

  /** Lets promise continuations run (answers arriving), without moving the clock. */
  async function answered(): Promise<void> {
    for (let round = 0; round < 5; round++) await Promise.resolve();
  }

  beforeEach(() => {
    vi.useFakeTimers();
    localStorage.clear();
    records = new FakeRecords();
    reported = [];
    TestBed.configureTestingModule({
      providers: [
        DraftStore,
        { provide: ModelRecords, useValue: records },
        { provide: ErrorHandler, useValue: { handleError: (error: unknown) => reported.push(error) } },
      ],
    });
  });

  afterEach(() => {
    vi.useRealTimers();
    localStorage.clear();
  });

  it('saves once after the user pauses, on the version it loaded, and drops the local copy when saved', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'P'));
    store.apply(labelled(store.model()!, 'Pressure'));
    expect(store.state()).toBe('pending');
    expect(localCopy()?.content).toEqual(labelled(stored, 'Pressure'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS - 1);
    expect(records.saves).toHaveLength(0);
    await vi.advanceTimersByTimeAsync(1);
    expect(records.saves).toHaveLength(1);
    expect(records.saves[0].version).toBe(3);
    expect(records.saves[0].content).toEqual(labelled(stored, 'Pressure'));
    expect(store.state()).toBe('saving');
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(store.state()).toBe('saved');
    expect(store.version()).toBe(4);
    expect(localCopy()).toBeNull();
  });

  it('sends edits made during a save on the version that save returned, and the local copy says so', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'first'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    store.apply(labelled(store.model()!, 'second'));
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(store.state()).toBe('pending');
    // Should the tab close now, the copy must go over version 4 (our own save), not 3.
    expect(localCopy()?.baseVersion).toBe(4);
    expect(localCopy()?.content).toEqual(labelled(stored, 'second'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1].version).toBe(4);
    expect(records.saves[1].content).toEqual(labelled(stored, 'second'));
  });

  it('after a reload puts back unsaved edits on their base version, so our own earlier save is no conflict', async () => {
    const first = makeStore();
    first.load(PROJECT, detail(3));
    first.apply(labelled(first.model()!, 'first'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    first.apply(labelled(first.model()!, 'second'));
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    // The tab closes before the second save: the server holds "first" at version 4.
    TestBed.resetTestingModule();
    records = new FakeRecords();
    TestBed.configureTestingModule({
      providers: [DraftStore, { provide: ModelRecords, useValue: records }, { provide: ErrorHandler, useValue: { handleError: (error: unknown) => reported.push(error) } }],
    });
    const second = makeStore();
    second.load(PROJECT, detail(4, reordered(labelled(stored, 'first'))));
    expect(second.restored()).toBe(true);
    expect(second.model()).toEqual(labelled(stored, 'second'));
    await vi.advanceTimersByTimeAsync(0);
    expect(records.saves).toHaveLength(1);
    expect(records.saves[0].version).toBe(4);
  });

  it('does not treat a local copy that only differs in key order (jsonb) as unsaved edits', async () => {
    localStorage.setItem(`proofline.draft.${MODEL}`, JSON.stringify({ baseVersion: 2, content: labelled(stored, 'Pressure') }));
    const store = makeStore();
    // The server got that save (version 3) and hands it back with its keys in another order.
    store.load(PROJECT, detail(3, reordered(labelled(stored, 'Pressure'))));
    expect(store.restored()).toBe(false);
    expect(store.state()).toBe('saved');
    expect(localCopy()).toBeNull();
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(0);
  });

  it('on a 409 keeps the edits, stops saving and lets the user keep them over the newer draft', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'mine'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    const theirs = draft(4, labelled(stored, 'theirs'), 'Lee Moreno');
    records.saves[0].reject(conflict(theirs));
    await answered();
    expect(store.state()).toBe('conflict');
    expect(store.conflict()).toEqual(theirs);
    expect(store.model()).toEqual(labelled(stored, 'mine'));
    // Typing goes on while the choice is open: kept, not sent.
    store.apply(labelled(store.model()!, 'mine, later'));
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS * 3);
    expect(records.saves).toHaveLength(1);
    expect(localCopy()?.content).toEqual(labelled(stored, 'mine, later'));
    const kept = store.keepMine();
    await answered();
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1].version).toBe(4);
    expect(records.saves[1].content).toEqual(labelled(stored, 'mine, later'));
    // Until that save is through, a reload would put the edits over version 4, not 3.
    expect(localCopy()?.baseVersion).toBe(4);
    records.saves[1].resolve(draft(5, records.saves[1].content));
    await kept;
    expect(store.state()).toBe('saved');
    expect(store.version()).toBe(5);
  });

  it('on a 409 "take theirs" shows the stored draft and leaves the edits one undo away', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'mine'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    records.saves[0].reject(conflict(draft(4, reordered(labelled(stored, 'theirs')), 'Lee Moreno')));
    await answered();
    store.takeTheirs();
    expect(store.state()).toBe('saved');
    expect(store.version()).toBe(4);
    expect((store.model() as FaultTreeDraft).events[0].label).toBe('theirs');
    store.undo();
    expect(store.model()).toEqual(labelled(stored, 'mine'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves.at(-1)?.version).toBe(4);
  });

  it('a 409 that holds exactly what was sent (an earlier try got through, its answer was lost) is no conflict', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'Pressure'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    // The connection drops after the server stored version 4.
    records.saves[0].reject(offline());
    await answered();
    expect(store.state()).toBe('failed');
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1].version).toBe(3);
    records.saves[1].reject(conflict(draft(4, reordered(labelled(stored, 'Pressure')), 'Dana Field')));
    await answered();
    expect(store.conflict()).toBeNull();
    expect(store.state()).toBe('saved');
    expect(store.version()).toBe(4);
    store.apply(labelled(store.model()!, 'next'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves[2].version).toBe(4);
  });

  it('offline: keeps every edit, retries with the latest content, reports the failure once, retries at once when back online', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'one'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    records.saves[0].reject(offline());
    await answered();
    expect(store.state()).toBe('failed');
    expect(store.error()).toContain('could not be reached');
    store.apply(labelled(store.model()!, 'two'));
    expect(localCopy()).toEqual({ baseVersion: 3, content: labelled(stored, 'two') });
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1].version).toBe(3);
    expect(records.saves[1].content).toEqual(labelled(stored, 'two'));
    records.saves[1].reject(offline());
    await answered();
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    records.saves[2].reject(offline());
    await answered();
    expect(reported).toHaveLength(1);
    // The connection comes back: no waiting for the next retry.
    window.dispatchEvent(new Event('online'));
    await vi.advanceTimersByTimeAsync(0);
    expect(records.saves).toHaveLength(4);
    records.saves[3].resolve(draft(4, records.saves[3].content));
    await answered();
    expect(store.state()).toBe('saved');
    expect(store.model()).toEqual(labelled(stored, 'two'));
    expect(localCopy()).toBeNull();
    store.dispose();
  });

  it('holds autosave while an action runs: the pending edit is saved first and the action gets that version', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'before solve'));
    let release!: () => void;
    let seen: { version: number; label: string | undefined } | null = null;
    const outcome = store.whileHeld(async (saved) => {
      seen = { version: saved.version, label: (saved.content as FaultTreeDraft).events[0].label };
      await new Promise<void>((resolve) => (release = resolve));
      return 'started';
    });
    await answered();
    expect(records.saves).toHaveLength(1);
    expect(records.saves[0].content).toEqual(labelled(stored, 'before solve'));
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(seen).toEqual({ version: 4, label: 'before solve' });
    // Edits while the action runs are kept but not sent, however long it takes.
    store.apply(labelled(store.model()!, 'during solve'));
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS * 4);
    expect(records.saves).toHaveLength(1);
    expect(store.state()).toBe('pending');
    expect(localCopy()?.content).toEqual(labelled(stored, 'during solve'));
    release();
    expect(await outcome).toEqual({ ran: true, value: 'started' });
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1].version).toBe(4);
    expect(records.saves[1].content).toEqual(labelled(stored, 'during solve'));
  });

  it('an action waits for a save in flight and then sends what was typed meanwhile before it runs', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'one'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    store.apply(labelled(store.model()!, 'two'));
    const versions: number[] = [];
    const outcome = store.whileHeld(async (saved) => void versions.push(saved.version));
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(records.saves).toHaveLength(2);
    expect(records.saves[1]).toMatchObject({ version: 4, content: labelled(stored, 'two') });
    expect(versions).toEqual([]);
    records.saves[1].resolve(draft(5, records.saves[1].content));
    expect((await outcome).ran).toBe(true);
    expect(versions).toEqual([5]);
  });

  it('an import run while held replaces the draft, and no save goes out on the version before it', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'before import'));
    const imported = labelled(stored, 'imported');
    let answerImport!: () => void;
    const outcome = store.whileHeld(async (saved) => {
      // The server writes the file as saved.version + 1; its answer takes a while.
      await new Promise<void>((resolve) => (answerImport = resolve));
      store.replaceWithStored(draft(saved.version + 1, reordered(imported)));
    });
    await answered();
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    // An edit that lands while the file goes in must not be sent on version 4 behind the import's back.
    store.apply(labelled(store.model()!, 'during import'));
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(1);
    answerImport();
    expect((await outcome).ran).toBe(true);
    expect(store.version()).toBe(5);
    expect(store.model()).toEqual(imported);
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(1);
    // What was there before is one undo away, and saving it goes over the import's version.
    store.undo();
    expect(store.model()).toEqual(labelled(stored, 'during import'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves[1]).toMatchObject({ version: 5, content: labelled(stored, 'during import') });
  });

  it('does not run the action when the edits cannot be saved first, and autosave goes on retrying', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'unsaved'));
    const ran: number[] = [];
    const outcome = store.whileHeld(async (saved) => void ran.push(saved.version));
    await answered();
    records.saves[0].reject(offline());
    expect(await outcome).toEqual({ ran: false, reason: 'failed' });
    expect(ran).toEqual([]);
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(2);

    records.saves[1].reject(conflict(draft(4, labelled(stored, 'theirs'), 'Lee Moreno')));
    await answered();
    expect(await store.whileHeld(async () => 'never')).toEqual({ ran: false, reason: 'conflict' });
    expect(store.model()).toEqual(labelled(stored, 'unsaved'));
  });

  it('sends the pending edit at once when the page closes, instead of leaving it in the browser only', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'typed just before leaving'));
    store.dispose();
    expect(records.saves).toHaveLength(1);
    expect(records.saves[0]).toMatchObject({ version: 3, content: labelled(stored, 'typed just before leaving') });
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(localCopy()).toBeNull();
    await vi.advanceTimersByTimeAsync(RETRY_DELAY_MS);
    expect(records.saves).toHaveLength(1);
  });

  it('an answer for a model shown before does not change the version of the model shown now', async () => {
    const store = makeStore();
    store.load(PROJECT, detail(3));
    store.apply(labelled(store.model()!, 'model A edit'));
    const otherId = '00000000-0000-4000-8000-000000000009';
    store.load(PROJECT, { ...detail(7), id: otherId });
    // A's edit went out on A's version at once.
    expect(records.saves).toHaveLength(1);
    expect(records.saves[0].version).toBe(3);
    records.saves[0].resolve(draft(4, records.saves[0].content));
    await answered();
    expect(store.version()).toBe(7);
    expect(localCopy()).toBeNull();
    store.apply(labelled(store.model()!, 'model B edit'));
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS);
    expect(records.saves[1].version).toBe(7);
  });
});
