/**
 * In-process wake-up for the outbox worker: a transaction that wrote mail calls `mailCommitted()`
 * once it has committed, and this instance's worker runs at once instead of at its next poll.
 * Other instances still find the row by their periodic poll (the backstop); nothing is held here
 * that another instance would need — a lost wake-up only delays a mail to the next poll.
 */
type Listener = () => void;
const listeners = new Set<Listener>();

export function onMailCommitted(listener: Listener): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

export function mailCommitted(): void {
  for (const l of listeners) {
    try {
      l();
    } catch (err) {
      console.error('[mail] wake-up listener failed:', (err as Error).message);
    }
  }
}
