export * from './users.js';
export * from './projects.js';
export * from './sifs.js';
export * from './sessions.js';
export * from './models.js';
export * from './solves.js';
export * from './reviews.js';
