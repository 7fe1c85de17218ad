import { EventEmitter } from 'node:events';

/**
 * In-process signals between the API and a scheduler running in the same process: schedules changed
 * (reload now rather than at the next periodic reload) and runs were queued (pick them up now rather than
 * at the next poll). Other processes learn the same through their periodic reload and poll.
 */
export const jobEvents = new EventEmitter<{ 'schedules-changed': []; 'runs-queued': [] }>();
jobEvents.setMaxListeners(50);
