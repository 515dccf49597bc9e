// Piscina loads this file in each worker; tsx (registered through execArgv) compiles the TypeScript.
export { default } from './validation-task.ts';
