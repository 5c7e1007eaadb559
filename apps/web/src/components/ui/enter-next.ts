import { useCallback, useLayoutEffect, useState, type KeyboardEvent } from 'react';

/** Where "Enter" can take the technician: every enabled form control but buttons and file pickers, in page order. */
const TARGETS =
  'input:not([type=hidden]):not([type=file]):not([type=button]):not([type=submit]):not([type=reset]):not([type=image]):not(:disabled), select:not(:disabled), textarea:not(:disabled)';
/** Fields where "Enter" moves on: those typed into on one line (a textarea's Enter is a new line; a checkbox's and a radio's do nothing). */
const SOURCES = 'input:not([type=checkbox]):not([type=radio]):not([type=range]):not([type=color]):not([readonly])';

const targetsIn = (root: HTMLElement) =>
  [...root.querySelectorAll<HTMLElement>(TARGETS)]
    .filter((el) => !el.closest('[inert]'))
    // Page order (not every DOM implementation answers a selector list in document order).
    .sort((a, b) => (a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING ? -1 : 1));
/** The group's own action (its save button), marked `data-enter-action`; else the form is submitted. */
const actionIn = (root: HTMLElement) => root.querySelector<HTMLElement>('[data-enter-action]');

/**
 * "Enter" in a field moves to the next field of the group (a form, or any element holding fields); in the
 * last field it moves to the group's action (an element marked `data-enter-action`, usually the save
 * button) or, without one, submits the form. The phone's keyboard shows "next" on every field but the last
 * (`enterkeyhint`), and "done" or "go" there.
 *
 *   const { attach, onKeyDown } = useEnterNext<HTMLFormElement>();
 *   <form ref={attach} onKeyDown={onKeyDown}>…<Button type="submit">Save</Button></form>
 */
export function useEnterNext<T extends HTMLElement>() {
  // The group's element, from a callback ref (so it is state, not read from a ref while rendering).
  const [root, attach] = useState<T | null>(null);

  // After every render (fields come and go with the form): what the keyboard's Enter key says.
  useLayoutEffect(() => {
    if (!root) return;
    const sources = targetsIn(root).filter((el): el is HTMLInputElement => el instanceof HTMLInputElement && el.matches(SOURCES));
    const targets = targetsIn(root);
    const lastHint = actionIn(root) ? 'done' : 'go';
    for (const el of sources) el.setAttribute('enterkeyhint', el === targets[targets.length - 1] ? lastHint : 'next');
  });

  const onKeyDown = useCallback((e: KeyboardEvent<T>) => {
    const root = e.currentTarget;
    const field = e.target;
    if (e.key !== 'Enter' || e.shiftKey || e.altKey || e.ctrlKey || e.metaKey || e.nativeEvent.isComposing) return;
    if (!(field instanceof HTMLInputElement) || !field.matches(SOURCES)) return;
    const targets = targetsIn(root);
    const i = targets.indexOf(field);
    if (i < 0) return;
    e.preventDefault();
    const next = targets[i + 1];
    if (next) {
      next.focus();
      if (next instanceof HTMLInputElement && next.matches(SOURCES)) next.select();
      return;
    }
    const action = actionIn(root);
    if (action) {
      action.focus();
      action.scrollIntoView?.({ block: 'nearest' });
    } else field.form?.requestSubmit();
  }, []);

  /** `attach` is the group element's ref. */
  return { attach, onKeyDown };
}
