import { EventEmitter } from 'node:events';

/** Wakes the mail worker of this process when deliveries are queued (other processes poll). */
export const mailEvents = new EventEmitter();
