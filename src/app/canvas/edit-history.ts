/** Undo/redo over immutable snapshots: every edit is a new value, so undoing is swapping references. */
export interface EditHistory<T> {
  readonly past: readonly T[];
  readonly present: T;
  readonly future: readonly T[];
}

/** How many steps back undo reaches; older steps are dropped. */
export const UNDO_DEPTH = 200;

export function startHistory<T>(present: T): EditHistory<T> {
  return { past: [], present, future: [] };
}

/** Records an edit: the old value goes onto the undo stack and the redo stack is cleared. */
export function recordEdit<T>(history: EditHistory<T>, next: T): EditHistory<T> {
  if (next === history.present) return history;
  return { past: [...history.past, history.present].slice(-UNDO_DEPTH), present: next, future: [] };
}

export function undo<T>(history: EditHistory<T>): EditHistory<T> {
  if (history.past.length === 0) return history;
  return {
    past: history.past.slice(0, -1),
    present: history.past[history.past.length - 1],
    future: [history.present, ...history.future],
  };
}

export function redo<T>(history: EditHistory<T>): EditHistory<T> {
  if (history.future.length === 0) return history;
  return { past: [...history.past, history.present], present: history.future[0], future: history.future.slice(1) };
}
