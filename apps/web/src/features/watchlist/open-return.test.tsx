/**
 * The Watchlist's answer to a refused repair booking (409 `open_return_exists`): the open work order it names,
 * and the offer to open it — its visit on the Visit screen, else the unit's file, where its work orders are.
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { MemoryRouter } from 'react-router-dom';
import type { OpenReturnDetails } from '@coilpath/contract';
import { ApiError } from '@/lib/api-client';
import { OpenReturnOffer, openReturnOf, workOrderHref } from './open-return';

const WO = '5b0c7a52-8a1e-4a43-9a55-0f3c1d2e4b61';
const UNIT = '0e6f2f61-4f0b-4c38-8f5a-6c1b9d7a2e10';
const VISIT = '9d3e1c7b-2a4f-4e58-b6c9-1f0a8e7d5c32';
const details: OpenReturnDetails = { workOrderId: WO, number: 10042, state: 'unplaced', unitId: UNIT, visitId: null };
const refused = (d: unknown, code = 'open_return_exists', status = 409) =>
  new ApiError(status, code, 'The repair visit already exists: WO-10042 (unplaced).', d);

describe('openReturnOf', () => {
  it('reads the open work order from a 409 open_return_exists', () => {
    expect(openReturnOf(refused(details))).toEqual(details);
  });
  it('is null for any other answer, or details that are not a work order', () => {
    expect(openReturnOf(refused(details, 'already_booked'))).toBeNull();
    expect(openReturnOf(refused(details, 'open_return_exists', 422))).toBeNull();
    expect(openReturnOf(refused({ workOrder: { id: WO } }))).toBeNull();
    expect(openReturnOf(refused(undefined))).toBeNull();
    expect(openReturnOf(new Error('network'))).toBeNull();
  });
});

describe('workOrderHref', () => {
  it('opens the visit when the work order has one, else the unit file', () => {
    expect(workOrderHref({ visitId: VISIT, unitId: UNIT })).toBe(`/visits/${VISIT}`);
    expect(workOrderHref({ visitId: null, unitId: UNIT })).toBe(`/units/${UNIT}`);
    expect(workOrderHref({ visitId: null, unitId: null })).toBeNull();
  });
});

describe('OpenReturnOffer', () => {
  const render = (wo: OpenReturnDetails) =>
    renderToStaticMarkup(
      <MemoryRouter>
        <OpenReturnOffer wo={wo} message="The repair visit already exists: WO-10042 (unplaced)." />
      </MemoryRouter>,
    );

  it('says no second visit was created and links to the unit file of an unplaced work order', () => {
    const html = render(details);
    expect(html).toContain('role="alert"');
    expect(html).toContain('No second visit was created; WO-10042 is in the Roster queue, not booked yet.');
    expect(html).toContain(`href="/units/${UNIT}"`);
    expect(html).toMatch(/Open WO-10042.*\(in the Unit file\)/);
  });

  it('links to the visit of a booked one', () => {
    const html = render({ ...details, state: 'booked', visitId: VISIT });
    expect(html).toContain('WO-10042 is booked.');
    expect(html).toContain(`href="/visits/${VISIT}"`);
    expect(html).not.toContain('/units/');
  });
});
