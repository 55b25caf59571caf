/** Throws the signal's reason when the solve was cancelled (checked between batches and phases). */
export function throwIfAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw signal.reason ?? new Error('the solve was cancelled');
}
