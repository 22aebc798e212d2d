// InFlightSlots: the back-pressure bookkeeping of dispatch (slots, the waiting line, and the event
// drain() waits on). Expected values follow from the documented contract in src/pipeline/in-flight.ts.
import { describe, expect, it } from 'vitest';
import { InFlightSlots } from '../../../src/pipeline/in-flight.js';

describe('InFlightSlots', () => {
  it('counts free room, less slots already promised', () => {
    const slots = new InFlightSlots(3);
    expect(slots.room()).toBe(3);
    slots.take('a');
    expect(slots.room()).toBe(2);
    expect(slots.room(2)).toBe(0);
    expect(slots.room(5)).toBe(0);
    slots.release('a');
    expect(slots.size).toBe(0);
  });

  it('keeps a waiting line in arrival order, each set once', () => {
    const slots = new InFlightSlots(1);
    slots.wait('s1');
    slots.wait('s2');
    slots.wait('s1');
    expect(slots.waitingCount).toBe(2);
    expect(slots.takeWaiting(1)).toEqual(['s1']);
    expect(slots.takeWaiting(5)).toEqual(['s2']);
    expect(slots.waitingCount).toBe(0);
  });

  it('lets a set dispatched by another way wait again later', () => {
    const slots = new InFlightSlots(1);
    slots.wait('s1');
    slots.dispatched('s1');
    slots.wait('s1');
    // The stale entry stays in line (skipped when taken, its set no longer open): two entries.
    expect(slots.takeWaiting(5)).toEqual(['s1', 's1']);
  });

  it('whenEmpty() resolves at once when nothing is in flight, else when the last slot is released', async () => {
    const slots = new InFlightSlots(4);
    await slots.whenEmpty();
    slots.take('a');
    slots.take('b');
    let woke = false;
    const waiting = slots.whenEmpty().then(() => {
      woke = true;
    });
    slots.release('a');
    await Promise.resolve();
    expect(woke).toBe(false);
    slots.release('b');
    await waiting;
    expect(woke).toBe(true);
  });
});
