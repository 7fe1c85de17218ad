// Worker threads start without the TypeScript loader under vitest; under `npm start` they inherit tsx's
// execArgv already, and registering twice is harmless.
/* global URL */
import { register } from 'tsx/esm/api';

register();
const { default: task } = await import(new URL('./tasks.ts', import.meta.url).href);
export default task;
