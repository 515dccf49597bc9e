export * from './users.js';
export * from './sessions.js';
export * from './farms.js';
export * from './seasons.js';
export * from './items.js';
export * from './prices.js';
export * from './records.js';
export * from './audit.js';
