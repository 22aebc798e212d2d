// The intake content cache: bytes kept until dispatch, within a byte budget, oldest evicted first.
import { describe, expect, it } from 'vitest';
import { ContentCache } from '../../../src/pipeline/content-cache.js';

const bytes = (n: number, fill = 1): Uint8Array => new Uint8Array(n).fill(fill);

describe('ContentCache', () => {
  it('hands the bytes back once (take forgets them)', () => {
    const cache = new ContentCache(1000);
    cache.put(1, bytes(100, 7));
    expect(cache.take(1)?.[0]).toBe(7);
    expect(cache.take(1)).toBeUndefined();
    expect(cache.sizeBytes).toBe(0);
  });

  it('stays within its budget by dropping the oldest entries', () => {
    const cache = new ContentCache(1000);
    for (let id = 1; id <= 5; id++) cache.put(id, bytes(240));
    expect(cache.sizeBytes).toBeLessThanOrEqual(1000);
    expect(cache.take(1)).toBeUndefined();
    expect(cache.take(5)).toBeDefined();
    expect(cache.take(2)).toBeDefined();
  });

  it('does not keep a file larger than a quarter of the budget (it is read from disk at dispatch)', () => {
    const cache = new ContentCache(1000);
    cache.put(1, bytes(251));
    expect(cache.take(1)).toBeUndefined();
    cache.put(2, bytes(250));
    expect(cache.take(2)).toBeDefined();
  });

  it('replaces an entry put twice without counting it twice', () => {
    const cache = new ContentCache(1000);
    cache.put(1, bytes(200));
    cache.put(1, bytes(100));
    expect(cache.sizeBytes).toBe(100);
    cache.delete(1);
    expect(cache.sizeBytes).toBe(0);
  });
});
