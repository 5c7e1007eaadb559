/**
 * The close-out rules the API and the Visit screen share: the root-cause choice and the leak-repair
 * confirmation (Coilpath's own rules; the cases are worked by hand, no outside source).
 */
import { describe, expect, it } from 'vitest';
import { leakRepairCloseRefusal, rootCauseChoice } from './visits';

const A = '00000000-0000-4000-8000-00000000000a';
const B = '00000000-0000-4000-8000-00000000000b';

describe('rootCauseChoice', () => {
  it('is none without findings, the only finding by default, and required among several', () => {
    expect(rootCauseChoice([], undefined)).toEqual({ ok: true, findingId: null });
    expect(rootCauseChoice([A], null)).toEqual({ ok: true, findingId: A });
    const refused = rootCauseChoice([A, B], undefined);
    expect(refused).toMatchObject({ ok: false, code: 'root_cause_required' });
    expect(refused.ok ? '' : refused.message).toContain('2 findings');
    expect(rootCauseChoice([A, B], B)).toEqual({ ok: true, findingId: B });
  });

  it('refuses a finding that is not the visit’s', () => {
    expect(rootCauseChoice([A], B)).toMatchObject({ ok: false, code: 'root_cause_unknown' });
    expect(rootCauseChoice([], A)).toMatchObject({ ok: false, code: 'root_cause_unknown' });
  });
});

describe('leakRepairCloseRefusal', () => {
  const repair = { verificationTests: 0 };
  it('asks only for a leak repair closed as resolved with neither a verification test nor a refrigerant entry', () => {
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined })?.code).toBe('leak_repair_unverified');
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: false })?.code).toBe('leak_repair_unverified');
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: true })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 1, confirmed: undefined })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: { verificationTests: 1 }, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'needs_return', refrigerantEntries: 0, confirmed: undefined })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: null, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined })).toBeNull();
  });
});
