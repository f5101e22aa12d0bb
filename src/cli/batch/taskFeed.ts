/**
 * The tasks of a batch as they become known: a search for runs pushes each run as it is found, so the pool can
 * start on the first ones while the search goes on (on a cluster's network file system the search alone can
 * take seconds). When the search ends the feed is closed with the order the results are to be handed on in
 * (path order), which is known only then.
 */
import type { BatchTask } from './tasks';

export class TaskFeed {
  private readonly list: BatchTask[] = [];
  private isClosed = false;
  private isCancelled = false;
  private resultOrder: readonly number[] | null = null;
  private readonly listeners = new Set<() => void>();

  /** A closed feed of known tasks, handed on in the order given. */
  static of(tasks: readonly BatchTask[]): TaskFeed {
    const feed = new TaskFeed();
    for (const t of tasks) feed.push(t);
    feed.close();
    return feed;
  }

  get tasks(): readonly BatchTask[] {
    return this.list;
  }

  get closed(): boolean {
    return this.isClosed;
  }

  /** Closed without its results: the search failed; tasks not yet started are dropped. */
  get cancelled(): boolean {
    return this.isCancelled;
  }

  /** Once closed: the indices of the tasks in the order their results are handed on. */
  get order(): readonly number[] | null {
    return this.resultOrder;
  }

  push(task: BatchTask): void {
    if (this.isClosed) throw new Error('TaskFeed: push after close');
    this.list.push(task);
    this.notify();
  }

  /** No more tasks. `order` (a permutation of the task indices) defaults to the order pushed. */
  close(order?: readonly number[]): void {
    if (this.isClosed) return;
    const n = this.list.length;
    const o = order ?? Array.from({ length: n }, (_, i) => i);
    if (o.length !== n || new Set(o).size !== n || o.some((i) => !Number.isInteger(i) || i < 0 || i >= n)) {
      throw new Error('TaskFeed: the order is not a permutation of the tasks');
    }
    this.resultOrder = o;
    this.isClosed = true;
    this.notify();
  }

  cancel(): void {
    if (this.isClosed) return;
    this.isCancelled = true;
    this.resultOrder = [];
    this.isClosed = true;
    this.notify();
  }

  /** Call `listener` whenever a task is pushed or the feed closes; returns a function that stops it. */
  onChange(listener: () => void): () => void {
    this.listeners.add(listener);
    return () => void this.listeners.delete(listener);
  }

  private notify(): void {
    for (const l of [...this.listeners]) l();
  }
}
