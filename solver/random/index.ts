export { createRandomStream, type RandomStream } from './xoshiro128.js';
