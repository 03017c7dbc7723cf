import type { Request } from 'express';
import type { EntityManager } from 'typeorm';
import type { ConsentRecord } from '../../entities/consent-record.js';

/** What a listener learns when a consent is withdrawn. */
export interface ConsentWithdrawnEvent {
  /** The record as it is after the withdrawal was written. */
  consent: ConsentRecord;
  /** The withdrawal's transaction: write follow-up facts with it so they commit or fail together. */
  tx: EntityManager;
  req: Request;
}

export type ConsentWithdrawnListener = (event: ConsentWithdrawnEvent) => Promise<void>;

const listeners: ConsentWithdrawnListener[] = [];

/**
 * Registers code to run inside every consent withdrawal (e.g. pulling showcase uses of the patient's
 * photos when a showcase consent is withdrawn). A listener that throws rolls the withdrawal back.
 * Returns a function that removes the listener.
 */
export function onConsentWithdrawn(listener: ConsentWithdrawnListener): () => void {
  listeners.push(listener);
  return () => {
    const i = listeners.indexOf(listener);
    if (i >= 0) listeners.splice(i, 1);
  };
}

/** Runs the listeners in registration order; called by the withdrawal route inside its transaction. */
export async function emitConsentWithdrawn(event: ConsentWithdrawnEvent): Promise<void> {
  for (const l of [...listeners]) await l(event);
}
