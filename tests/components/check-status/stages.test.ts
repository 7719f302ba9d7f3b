import { describe, expect, it } from 'vitest';
import { isSettled, pollInterval, progressPercent, stageWords } from '@/components/check-status/stages';
import { STAGES } from '@/lib/checks/run-analysis';

describe('the check status words', () => {
  it('has words of its own for every stage the worker reports', () => {
    for (const stage of Object.keys(STAGES)) {
      const w = stageWords({ status: 'running', stage });
      expect(w).not.toMatch(/^Working:/);
      expect(w.length).toBeGreaterThan(5);
    }
    expect(stageWords({ status: 'running', stage: 'something new' })).toBe('Working: something new');
  });

  it('stops polling once the check is done, needs review or failed, and not before', () => {
    for (const s of ['done', 'failed', 'needs-review']) {
      expect(isSettled(s)).toBe(true);
      expect(pollInterval({ status: s }, 0)).toBe(false);
    }
    for (const s of ['queued', 'running']) expect(pollInterval({ status: s }, 0)).toBeGreaterThan(0);
    expect(pollInterval(undefined, 0)).toBeGreaterThan(0);
    // Gentler for a long wait.
    expect(pollInterval({ status: 'running' }, 200) as number).toBeGreaterThan(pollInterval({ status: 'running' }, 0) as number);
  });

  it('shows the bar at 0 while waiting, the stage progress while running, and full once settled', () => {
    expect(progressPercent({ status: 'queued', progress: 0.5 })).toBe(0);
    expect(progressPercent({ status: 'running', progress: STAGES['finding holes'] })).toBe(40);
    expect(progressPercent({ status: 'running', progress: 1 })).toBe(99);
    expect(progressPercent({ status: 'running', progress: null })).toBe(0);
    expect(progressPercent({ status: 'done', progress: 0.2 })).toBe(100);
  });
});
