// @vitest-environment jsdom
/**
 * Notices leave on their own unless they offer an action, and wait while the technician is on one; the
 * newest few are kept. Timers are vitest's fake ones (no waiting on the wall clock).
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { act, cleanup, fireEvent, render, screen } from '@testing-library/react';
import { NOTICE_MS, NoticesProvider, useNotify, type NoticeAction } from './notices';

function Trigger({ text, tone, action }: { text: string; tone?: 'ok' | 'alarm'; action?: NoticeAction }) {
  const notify = useNotify();
  return (
    <button type="button" onClick={() => notify(text, tone, action ? { action } : undefined)}>
      say {text}
    </button>
  );
}

beforeEach(() => vi.useFakeTimers());
afterEach(() => {
  cleanup();
  vi.useRealTimers();
});

const notices = () => [...document.querySelectorAll('[aria-live="polite"] > [role]')].map((n) => n.textContent);

describe('notices', () => {
  it('leave on their own: a plain one after its time, an alarm after its longer time', () => {
    render(
      <NoticesProvider>
        <Trigger text="Saved." />
        <Trigger text="Refused." tone="alarm" />
      </NoticesProvider>,
    );
    fireEvent.click(screen.getByText('say Saved.'));
    fireEvent.click(screen.getByText('say Refused.'));
    expect(screen.getByRole('status').textContent).toContain('Saved.');
    expect(screen.getByRole('alert').textContent).toContain('Refused.');
    act(() => vi.advanceTimersByTime(NOTICE_MS.ok - 1));
    expect(notices()).toHaveLength(2);
    act(() => vi.advanceTimersByTime(1));
    expect(notices()).toEqual(['Refused.']);
    act(() => vi.advanceTimersByTime(NOTICE_MS.alarm - NOTICE_MS.ok));
    expect(notices()).toEqual([]);
  });

  it('one that needs an action stays until it is used', () => {
    const run = vi.fn();
    render(
      <NoticesProvider>
        <Trigger text="Not sent." tone="alarm" action={{ label: 'Retry', run }} />
      </NoticesProvider>,
    );
    fireEvent.click(screen.getByText('say Not sent.'));
    act(() => vi.advanceTimersByTime(NOTICE_MS.alarm * 10));
    expect(notices()).toHaveLength(1);
    fireEvent.click(screen.getByRole('button', { name: 'Retry' }));
    expect(run).toHaveBeenCalledOnce();
    expect(notices()).toEqual([]);
  });

  it('waits while focused, then leaves its full time after; Dismiss removes it at once', () => {
    render(
      <NoticesProvider>
        <Trigger text="Saved." />
      </NoticesProvider>,
    );
    fireEvent.click(screen.getByText('say Saved.'));
    const dismiss = screen.getByRole('button', { name: 'Dismiss' });
    fireEvent.focus(dismiss);
    act(() => vi.advanceTimersByTime(NOTICE_MS.ok * 3));
    expect(notices()).toHaveLength(1);
    fireEvent.blur(dismiss);
    act(() => vi.advanceTimersByTime(NOTICE_MS.ok - 1));
    expect(notices()).toHaveLength(1);
    fireEvent.click(dismiss);
    expect(notices()).toEqual([]);
  });

  it('keeps the newest three', () => {
    render(
      <NoticesProvider>
        {['1', '2', '3', '4'].map((t) => (
          <Trigger key={t} text={t} />
        ))}
      </NoticesProvider>,
    );
    for (const t of ['1', '2', '3', '4']) fireEvent.click(screen.getByText(`say ${t}`));
    expect(notices()).toEqual(['2', '3', '4']);
  });
});
