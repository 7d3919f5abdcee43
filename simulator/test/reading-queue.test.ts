import { describe, expect, it } from 'vitest';
import type { OutgoingReading } from '@wellkept/core';
import { ReadingQueue } from '../src/gateway/reading-queue.js';

const readings = (from: number, n: number): OutgoingReading[] =>
  Array.from({ length: n }, (_, i) => ({ name: 'battery/voltage', t: from + i, value: 25 }));

describe('the store-and-forward queue', () => {
  it('keeps order across chunks and takes from the front', () => {
    const q = new ReadingQueue(100);
    q.push(readings(0, 3));
    q.push(readings(3, 4));
    expect(q.take(5).map((r) => r.t)).toEqual([0, 1, 2, 3, 4]);
    expect(q.length).toBe(2);
    q.unshift(readings(100, 2));
    expect(q.take(10).map((r) => r.t)).toEqual([100, 101, 5, 6]);
    expect(q.length).toBe(0);
  });

  it('drops the oldest readings first when full, and counts them', () => {
    const q = new ReadingQueue(10);
    q.push(readings(0, 6));
    q.push(readings(6, 6));
    expect(q.length).toBe(10);
    expect(q.dropped).toBe(2);
    q.push(readings(12, 25));
    expect(q.dropped).toBe(27);
    expect(q.take(100).map((r) => r.t)).toEqual([27, 28, 29, 30, 31, 32, 33, 34, 35, 36]);
  });
});
