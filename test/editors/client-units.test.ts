// Behaviour of the client's editor-free pieces: the crash-restart budget, the sample
// period parser behind "Discretize at Period…", and the node flags the server starts with.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { RestartBudget } from '../../client/src/restartPolicy';
import { parsePeriod } from '../../client/src/period';
import { serverNodeArgs } from '../../client/src/serverArgs';

describe('RestartBudget (4 restarts within 3 minutes, then stop)', () => {
  const minute = 60_000;

  it('grants four restarts in quick succession and refuses the fifth', () => {
    const budget = new RestartBudget({ maxRestarts: 4, windowMs: 3 * minute });
    const decisions = [0, 1000, 2000, 3000, 4000].map((t) => budget.onCrash(t));
    expect(decisions.map((d) => d.restart)).toEqual([true, true, true, true, false]);
    expect(decisions[4]).toEqual({ restart: false, crashesInWindow: 5 });
  });

  it('forgets restarts older than the window', () => {
    const budget = new RestartBudget({ maxRestarts: 4, windowMs: 3 * minute });
    for (const t of [0, 1, 2, 3]) expect(budget.onCrash(t).restart).toBe(true);
    expect(budget.onCrash(10).restart).toBe(false);
    // The first restart (t = 0) has left the window at t = 3 min.
    expect(budget.onCrash(3 * minute)).toEqual({ restart: true, usedInWindow: 4 });
  });

  it('a user restart starts a fresh budget', () => {
    const budget = new RestartBudget({ maxRestarts: 1, windowMs: minute });
    expect(budget.onCrash(0).restart).toBe(true);
    expect(budget.onCrash(1).restart).toBe(false);
    budget.reset();
    expect(budget.onCrash(2).restart).toBe(true);
  });
});

describe('parsePeriod', () => {
  it.each([
    ['0.01', 0.01],
    ['1e-3', 0.001],
    ['.5', 0.5],
    [' 2 ', 2],
    ['1/100', 0.01],
    ['0.02 s', 0.02],
    ['2.5E+1', 25],
  ])('reads %s as %d seconds', (input, expected) => {
    expect(parsePeriod(input)).toEqual({ ok: true, period: expected });
  });

  it.each(['', '0', '-0.1', 'abc', '1/0', '0/5', '1e999', 'process.exit()', '0.1; rm', '1//2'])(
    'rejects %j with a reason',
    (input) => {
      const parsed = parsePeriod(input);
      expect(parsed.ok).toBe(false);
      if (!parsed.ok) expect(parsed.reason.length).toBeGreaterThan(10);
    },
  );
});

describe('server node flags (client/src/serverArgs.ts)', () => {
  const manifest = JSON.parse(readFileSync(join(__dirname, '..', '..', 'package.json'), 'utf8'));

  it('takes the manifest flags the server is started with', () => {
    expect(serverNodeArgs(manifest)).toEqual(manifest.eigenlensServerNodeArgs);
    expect(serverNodeArgs(manifest)).toContain('--max-semi-space-size=8');
  });

  it('ignores a field that is not a list of plain node flags', () => {
    for (const bad of [undefined, null, 'x', ['--ok', 3], ['--inspect=0.0.0.0:9229 --x'], ['-e', 'code'], [' --a']]) expect(serverNodeArgs({ eigenlensServerNodeArgs: bad })).toEqual([]);
    expect(serverNodeArgs(null)).toEqual([]);
  });
});
