export { simulateFaultTreeModel, MAX_SAMPLES, MONTE_CARLO_ENGINE_VERSION, type MonteCarloOptions } from './simulate-fault-tree.js';
