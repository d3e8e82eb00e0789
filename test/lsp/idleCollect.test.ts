// The idle collector (lsp/idleCollect.ts): one full collection after a quiet period, none
// while work is pending, and garbage really goes (measured with a FinalizationRegistry, the
// engine's own report that an object was collected).
import { describe, expect, it } from 'vitest';
import { HEAP_GROWING_PERCENT, heapGrowingPercentFromEnv, IdleCollector } from '../../server/src/lsp/idleCollect';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('IdleCollector', () => {
  it('collects once after a quiet period, and the garbage is gone', async () => {
    const collected: string[] = [];
    const registry = new FinalizationRegistry<string>((name) => collected.push(name));
    (() => {
      registry.register({ big: new Array(100_000).fill(1) }, 'garbage');
    })();
    const idle = new IdleCollector(20);
    idle.touch();
    idle.touch();
    await sleep(80);
    expect(idle.collections).toBe(1);
    await sleep(20); // finalization callbacks run as tasks after the collection
    expect(collected).toContain('garbage');
    await sleep(60);
    expect(idle.collections).toBe(1); // nothing new happened, so no second collection
  });

  it('does not collect while work is pending', async () => {
    const idle = new IdleCollector(20);
    idle.touch();
    idle.cancel();
    await sleep(60);
    expect(idle.collections).toBe(0);
  });

  it('skips the collection when the heap would take longer than its pause bound', async () => {
    // The bound is tiny here, so any heap is "too large": the quiet period passes without a pause.
    const idle = new IdleCollector(20, 0.001);
    idle.touch();
    await sleep(60);
    expect(idle.collections).toBe(0);
    expect(idle.skipped).toBe(1);
  });

  it('work during a collection gets a collection of its own afterwards', async () => {
    const idle = new IdleCollector(5);
    idle.touch();
    await sleep(7); // the first collection has started and may still be marking
    idle.touch(); // new work: its quiet period may end while that collection runs
    await sleep(200);
    expect(idle.collections).toBe(2);
    await sleep(50);
    expect(idle.collections).toBe(2);
  });
});

describe('heap growth bound override (EIGENLENS_HEAP_GROWING_PERCENT)', () => {
  it('takes a whole number in range, "off", and ignores anything else', () => {
    expect(heapGrowingPercentFromEnv(undefined)).toBe(HEAP_GROWING_PERCENT);
    expect(heapGrowingPercentFromEnv('50')).toBe(50);
    expect(heapGrowingPercentFromEnv('off')).toBeNull();
    for (const bad of ['0', '-5', '12.5', '1001', 'lots', '']) expect(heapGrowingPercentFromEnv(bad)).toBe(HEAP_GROWING_PERCENT);
  });
});
