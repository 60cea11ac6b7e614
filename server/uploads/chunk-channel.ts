/**
 * Hands the chunks of an upload still in transfer to the ingest while the same bytes go to disk,
 * so parsing and storing overlap with the transfer instead of waiting for it. Bounded: when the
 * ingest falls behind, the producer is told to pause (and so, through TCP, the browser).
 */
export class ChunkChannel implements AsyncIterable<Buffer> {
  private queue: Buffer[] = []
  private queuedBytes = 0
  private ended = false
  private failure: Error | null = null
  private detached = false
  private wakeConsumer: (() => void) | null = null
  private resumeProducer: (() => void) | null = null

  constructor(private readonly highWaterBytes = 8 * 1024 * 1024) {}

  /** Producer side. False means "pause until the callback given to whenReady runs". */
  push(chunk: Buffer): boolean {
    if (this.detached) return true
    this.queue.push(chunk)
    this.queuedBytes += chunk.length
    this.wake()
    return this.queuedBytes < this.highWaterBytes
  }

  whenReady(resume: () => void): void {
    if (this.detached || this.queuedBytes < this.highWaterBytes) resume()
    else this.resumeProducer = resume
  }

  end(): void {
    this.ended = true
    this.wake()
  }

  fail(error: Error): void {
    this.failure ??= error
    this.wake()
    this.releaseProducer()
  }

  /** The consumer stops reading: later chunks are dropped and the producer never waits again. */
  detach(): void {
    this.detached = true
    this.queue = []
    this.queuedBytes = 0
    this.releaseProducer()
  }

  get isDetached(): boolean {
    return this.detached
  }

  /** The first `bytes` bytes (fewer if the upload is shorter), without consuming them. */
  async peek(bytes: number): Promise<{ head: Buffer; complete: boolean }> {
    while (this.queuedBytes < bytes && !this.ended) {
      if (this.failure) throw this.failure
      await new Promise<void>((resolve) => (this.wakeConsumer = resolve))
    }
    if (this.failure) throw this.failure
    const all = Buffer.concat(this.queue)
    return { head: all.subarray(0, bytes), complete: this.ended && all.length <= bytes }
  }

  async *[Symbol.asyncIterator](): AsyncIterator<Buffer> {
    for (;;) {
      if (this.failure) throw this.failure
      const chunk = this.queue.shift()
      if (chunk) {
        this.queuedBytes -= chunk.length
        if (this.queuedBytes < this.highWaterBytes / 2) this.releaseProducer()
        yield chunk
        continue
      }
      if (this.ended) return
      await new Promise<void>((resolve) => (this.wakeConsumer = resolve))
    }
  }

  private wake(): void {
    const wake = this.wakeConsumer
    this.wakeConsumer = null
    wake?.()
  }

  private releaseProducer(): void {
    const resume = this.resumeProducer
    this.resumeProducer = null
    resume?.()
  }
}
