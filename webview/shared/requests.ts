/**
 * Requests a webview sends to the extension host, matched with their answers by request id. The view only
 * cares about its latest request: starting a new one drops the open one, so a late answer to it is told
 * apart ("stale") from an answer to an id this view never sent ("unknown"). Each request keeps a context
 * (what was asked) that comes back with its answer. No DOM, no messages: callers post and receive.
 */

/** What an answer's request id means here. */
export type Answered<C> = { state: 'current'; context: C } | { state: 'stale' } | { state: 'unknown' };

export class LatestRequest<C> {
  private issued = 0;
  private open: { id: number; context: C } | null = null;

  /** Starts a request with its context; returns the id to send. An earlier open request is dropped. */
  start(context: C): number {
    this.issued += 1;
    this.open = { id: this.issued, context };
    return this.issued;
  }

  /** The answer to request `id` has come: its context when it answers the open request (which closes). */
  settle(id: number): Answered<C> {
    const open = this.open;
    if (open && open.id === id) {
      this.open = null;
      return { state: 'current', context: open.context };
    }
    return Number.isInteger(id) && id >= 1 && id <= this.issued ? { state: 'stale' } : { state: 'unknown' };
  }

  /** Whether a request is waiting for its answer. */
  get waiting(): boolean {
    return this.open !== null;
  }
}
