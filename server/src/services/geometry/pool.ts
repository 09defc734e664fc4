/**
 * A small pool of worker threads for geometry that can take long (drawing influence zones with
 * turf's buffer: seconds for an intricate outline), so the request thread keeps answering others.
 * Workers start on first use and are kept; an idle pool does not hold the process open. A task that
 * runs past `timeoutMs` ends its worker (a fresh one replaces it) and is refused.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { ShapeInput, Shapes, SiteOrigin } from '@shared/geometry/shapes';

export class GeometryTimeout extends Error {
  override name = 'GeometryTimeout';
}

interface Task {
  id: number;
  input: ShapeInput;
  site: SiteOrigin;
  resolve: (s: Shapes) => void;
  reject: (e: Error) => void;
}

interface Slot {
  worker: Worker;
  ready: Promise<void>;
  task: Task | null;
  timer: NodeJS.Timeout | null;
}

export class GeometryPool {
  private slots: Slot[] = [];
  private queue: Task[] = [];
  private nextId = 1;
  private closed = false;

  constructor(
    // One core is left to the request thread: on a 2-core machine, one worker.
    readonly size = Math.max(1, Math.min(2, availableParallelism() - 1)),
    readonly timeoutMs = 20_000,
  ) {}

  /** Outline and influence zone of one excavation, drawn in a worker. */
  shapes(input: ShapeInput, site: SiteOrigin): Promise<Shapes> {
    if (this.closed) return Promise.reject(new Error('geometry pool is closed'));
    return new Promise((resolve, reject) => {
      this.queue.push({ id: this.nextId++, input, site, resolve, reject });
      this.pump();
    });
  }

  /** Shapes of many excavations, spread over the workers; in the order given. */
  all(inputs: ShapeInput[], site: SiteOrigin): Promise<Shapes[]> {
    return Promise.all(inputs.map((i) => this.shapes(i, site)));
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const t of this.queue.splice(0)) t.reject(new Error('geometry pool is closed'));
    await Promise.all(this.slots.map((s) => s.worker.terminate()));
    this.slots = [];
  }

  private spawn(): Slot {
    const worker = new Worker(new URL('./worker.mjs', import.meta.url));
    const slot: Slot = { worker, task: null, timer: null, ready: Promise.resolve() };
    slot.ready = new Promise((resolve, reject) => {
      const first = (m: { ready?: boolean }) => {
        if (m?.ready) {
          worker.off('error', reject);
          resolve();
        }
      };
      worker.once('message', first);
      worker.once('error', reject);
    });
    worker.on('message', (m: { id?: number; shapes?: Shapes; error?: string }) => {
      const task = slot.task;
      if (!task || m.id !== task.id) return;
      this.finish(slot);
      if (m.error !== undefined) task.reject(new Error(m.error));
      else task.resolve(m.shapes!);
    });
    worker.on('error', (e) => this.lose(slot, e));
    worker.on('exit', () => this.lose(slot, new Error('geometry worker stopped')));
    worker.unref();
    this.slots.push(slot);
    return slot;
  }

  /** A worker failed or was ended: refuse its task, drop it, carry on with the queue. */
  private lose(slot: Slot, e: Error): void {
    const i = this.slots.indexOf(slot);
    if (i < 0) return;
    this.slots.splice(i, 1);
    const task = slot.task;
    this.finish(slot);
    task?.reject(e);
    this.pump();
  }

  private finish(slot: Slot): void {
    if (slot.timer) clearTimeout(slot.timer);
    slot.timer = null;
    slot.task = null;
    slot.worker.unref();
    queueMicrotask(() => this.pump());
  }

  private pump(): void {
    while (this.queue.length && !this.closed) {
      const slot = this.slots.find((s) => !s.task) ?? (this.slots.length < this.size ? this.spawn() : null);
      if (!slot) return;
      const task = this.queue.shift()!;
      slot.task = task;
      slot.worker.ref();
      slot.timer = setTimeout(() => {
        void slot.worker.terminate();
        this.lose(slot, new GeometryTimeout(`drawing the excavation took longer than ${this.timeoutMs / 1000} s`));
      }, this.timeoutMs);
      slot.ready.then(
        () => slot.task === task && slot.worker.postMessage({ id: task.id, input: task.input, site: task.site }),
        (e: Error) => this.lose(slot, e),
      );
    }
  }
}
