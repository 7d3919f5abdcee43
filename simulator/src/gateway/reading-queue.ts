/**
 * The gateway's store-and-forward buffer: readings waiting to be sent, oldest first, bounded.
 * When it is full the oldest readings are dropped and counted (a real gateway's flash is finite;
 * the newest data matter most). Kept as a list of chunks so that taking from the front and
 * dropping the oldest stay cheap with hundreds of thousands of readings waiting.
 */
import type { OutgoingReading } from '@wellkept/core';

export class ReadingQueue {
  private chunks: OutgoingReading[][] = [];
  private head = 0;
  private count = 0;
  /** Readings dropped because the buffer was full, since the start. */
  dropped = 0;

  constructor(readonly capacity: number) {}

  get length(): number {
    return this.count;
  }

  /** Adds readings at the back, dropping the oldest beyond the capacity. */
  push(readings: readonly OutgoingReading[]): void {
    if (readings.length === 0) return;
    this.chunks.push([...readings]);
    this.count += readings.length;
    if (this.count > this.capacity) this.dropOldest(this.count - this.capacity);
  }

  /** Puts readings back at the front (a pack that was not acknowledged). */
  unshift(readings: readonly OutgoingReading[]): void {
    if (readings.length === 0) return;
    this.compact();
    this.chunks.unshift([...readings]);
    this.count += readings.length;
    if (this.count > this.capacity) this.dropOldest(this.count - this.capacity);
  }

  /** Takes up to `max` readings from the front. */
  take(max: number): OutgoingReading[] {
    const out: OutgoingReading[] = [];
    while (out.length < max && this.chunks.length > 0) {
      const chunk = this.chunks[0] as OutgoingReading[];
      const want = Math.min(max - out.length, chunk.length - this.head);
      for (let i = 0; i < want; i += 1) out.push(chunk[this.head + i] as OutgoingReading);
      this.head += want;
      if (this.head >= chunk.length) {
        this.chunks.shift();
        this.head = 0;
      }
    }
    this.count -= out.length;
    return out;
  }

  private dropOldest(n: number): void {
    let left = n;
    while (left > 0 && this.chunks.length > 0) {
      const chunk = this.chunks[0] as OutgoingReading[];
      const available = chunk.length - this.head;
      if (available <= left) {
        this.chunks.shift();
        this.head = 0;
        left -= available;
      } else {
        this.head += left;
        left = 0;
      }
    }
    const removed = n - left;
    this.count -= removed;
    this.dropped += removed;
  }

  private compact(): void {
    if (this.head > 0 && this.chunks.length > 0) {
      this.chunks[0] = (this.chunks[0] as OutgoingReading[]).slice(this.head);
      this.head = 0;
    }
  }
}
