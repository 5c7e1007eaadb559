// @vitest-environment jsdom
/**
 * A Unit file table wider than a phone scrolls sideways: its wrapper is a focusable region named by the table's
 * caption, so a keyboard reaches and scrolls it (axe: scrollable-region-focusable).
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { UnitTable } from './unit-table';

describe('UnitTable', () => {
  it('wraps the table in a focusable region labelled by its caption', () => {
    const html = renderToStaticMarkup(
      <UnitTable caption="Readings of circuit 1" head={['Taken', 'Suction']}>
        <tr>
          <td>7 Dec 2026</td>
          <td>118 psig</td>
        </tr>
      </UnitTable>,
    );
    const doc = new DOMParser().parseFromString(html, 'text/html');
    const region = doc.querySelector('[role="region"]');
    expect(region?.getAttribute('tabindex')).toBe('0');
    const caption = doc.getElementById(region?.getAttribute('aria-labelledby') ?? '');
    expect(caption?.tagName).toBe('CAPTION');
    expect(caption?.textContent).toBe('Readings of circuit 1');
    expect(region?.querySelector('table')).not.toBeNull();
  });
});
