/** Options shared by every engine. Defaults are stated per field. */
export interface SolveOptions {
  /** 'exact' (fault tree BDD or Markov, by the model's kind) or 'montecarlo'. Default 'exact'. */
  readonly method?: 'exact' | 'montecarlo';
  /** Number of output time points of the curve, breakpoints added on top. Default 1,000. */
  readonly timePoints?: number;
  /** Monte Carlo: number of simulated missions. Default 10,000. */
  readonly samples?: number;
  /** Monte Carlo: seed of the random stream. Default 1. */
  readonly seed?: number;
  /** Checked between phases and batches; an aborted solve throws the signal's reason. */
  readonly signal?: AbortSignal;
  /** Called with the fraction done in [0, 1] and a short description of the stage. */
  readonly onProgress?: (fraction: number, stage: string) => void;
}
