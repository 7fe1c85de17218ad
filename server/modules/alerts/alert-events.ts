import { EventEmitter } from 'node:events';

/** What new evidence a module has just committed; the alert check listens (see listenForEvidence). */
export type EvidenceEvent =
  | { source: 'import'; importBatchId: number }
  | { source: 'snapshot'; snapshotId: number; categoryId: number };

export const alertEvents = new EventEmitter<{ evidence: [EvidenceEvent]; raised: [] }>();

/** The one call the import and snapshot modules make after they commit. */
export function evidenceArrived(event: EvidenceEvent): void {
  alertEvents.emit('evidence', event);
}
