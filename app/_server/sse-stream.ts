// A Server-Sent Events stream that never queues without bound. The response's stream holds at
// most `highWaterMark` events; past that (a slow or stalled client) each new event is either
// coalesced — only the newest of a key is kept, e.g. one live snapshot per line — or, for keyless
// events, kept in a short queue whose oldest entries are dropped. Whenever something was
// superseded or dropped, the client is told with a "reset" event so it refetches what it missed.
import "server-only";

export type SseOptions = {
  /** events held in the stream before the sender starts coalescing */
  highWaterMark?: number;
  /** keyless events kept while the client is behind */
  maxQueued?: number;
  /** called once when the client goes away or the stream is closed */
  onClose?: () => void;
};

export class SseStream {
  readonly stream: ReadableStream<Uint8Array>;
  private controller: ReadableStreamDefaultController<Uint8Array> | null = null;
  private readonly coalesced = new Map<string, string>();
  private readonly queue: string[] = [];
  private readonly maxQueued: number;
  private readonly encoder = new TextEncoder();
  private closed = false;
  private lost = false;
  /** events superseded or dropped because the client was behind (for tests and logs) */
  skipped = 0;

  constructor(private readonly opts: SseOptions = {}) {
    this.maxQueued = opts.maxQueued ?? 50;
    this.stream = new ReadableStream<Uint8Array>(
      {
        start: (controller) => {
          this.controller = controller;
        },
        pull: () => this.flush(),
        cancel: () => this.close(false),
      },
      new CountQueuingStrategy({ highWaterMark: opts.highWaterMark ?? 32 }),
    );
  }

  get isClosed(): boolean {
    return this.closed;
  }

  /** Sends an SSE event; with `coalesceKey`, a newer event of the same key replaces a waiting one. */
  event(name: string, data: unknown, opts: { id?: number; coalesceKey?: string } = {}): void {
    const text = `${opts.id !== undefined ? `id: ${opts.id}\n` : ""}event: ${name}\ndata: ${JSON.stringify(data)}\n\n`;
    this.send(text, opts.coalesceKey);
  }

  /** Raw SSE text (e.g. "retry: 3000\n\n"). */
  send(text: string, coalesceKey?: string): void {
    if (this.closed || !this.controller) return;
    const behind = this.queue.length > 0 || this.coalesced.size > 0 || (this.controller.desiredSize ?? 0) <= 0;
    if (!behind) {
      this.enqueue(text);
      return;
    }
    if (coalesceKey !== undefined) {
      if (this.coalesced.has(coalesceKey)) {
        this.skipped++;
        this.lost = true;
        this.coalesced.delete(coalesceKey);
      }
      this.coalesced.set(coalesceKey, text);
    } else {
      this.queue.push(text);
      if (this.queue.length > this.maxQueued) {
        this.queue.shift();
        this.skipped++;
        this.lost = true;
      }
    }
  }

  /** Ends the stream (`endStream`: also close the response; false when the client already left). */
  close(endStream = true): void {
    if (this.closed) return;
    this.closed = true;
    this.queue.length = 0;
    this.coalesced.clear();
    if (endStream) {
      try {
        this.controller?.close();
      } catch {
        /* the client closed it first */
      }
    }
    this.opts.onClose?.();
  }

  private flush(): void {
    const c = this.controller;
    if (!c || this.closed) return;
    while ((c.desiredSize ?? 0) > 0 && this.queue.length > 0) this.enqueue(this.queue.shift()!);
    for (const [key, text] of this.coalesced) {
      if ((c.desiredSize ?? 0) <= 0) return;
      this.coalesced.delete(key);
      this.enqueue(text);
    }
    if (this.lost && this.queue.length === 0 && this.coalesced.size === 0) {
      this.lost = false;
      this.enqueue(`event: reset\ndata: ${JSON.stringify({ reason: "behind" })}\n\n`);
    }
  }

  private enqueue(text: string): void {
    try {
      this.controller!.enqueue(this.encoder.encode(text));
    } catch {
      this.close(false);
    }
  }
}
