export { generateModels, MAX_GENERATED_STATES, type GeneratedModels } from './generate-models.js';
