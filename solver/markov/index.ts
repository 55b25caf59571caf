export { solveMarkovModel, MARKOV_ENGINE_VERSION, MAX_STATE_VALUES, type MarkovSolveOptions } from './solve-markov-model.js';
export { MAX_NONZEROS } from './compile-chain.js';
export { expm } from './dense-exponential.js';
