/**
 * The close-out rules the API and the Visit screen share: the root-cause choice, the leak-repair
 * confirmation and the customer's sign-off (Coilpath's own rules; the cases are worked by hand, no outside source).
 */
import { describe, expect, it } from 'vitest';
import {
  closeSignatureSchema,
  closeVisitSchema,
  leakRepairCloseRefusal,
  rootCauseChoice,
  signatureChoiceRefusal,
  signatureMaxBytes,
} from './visits';

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
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined })?.code).toBe(
      'leak_repair_unverified',
    );
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: false })?.code).toBe(
      'leak_repair_unverified',
    );
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 0, confirmed: true })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'resolved', refrigerantEntries: 1, confirmed: undefined })).toBeNull();
    expect(
      leakRepairCloseRefusal({ leakRepair: { verificationTests: 1 }, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined }),
    ).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: repair, outcome: 'needs_return', refrigerantEntries: 0, confirmed: undefined })).toBeNull();
    expect(leakRepairCloseRefusal({ leakRepair: null, outcome: 'resolved', refrigerantEntries: 0, confirmed: undefined })).toBeNull();
  });
});

describe('signatureChoiceRefusal and closeSignatureSchema', () => {
  // The first 8 bytes of every PNG (PNG spec §5.2: 89 50 4E 47 0D 0A 1A 0A) then an IHDR length, in base64.
  const pngStart = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]).toString('base64');

  it('requires one of the two choices at close-out, and accepts either', () => {
    expect(signatureChoiceRefusal(undefined)).toMatchObject({ code: 'signature_required' });
    expect(signatureChoiceRefusal(null)?.message).toMatch(/Customer not available/);
    expect(signatureChoiceRefusal({ kind: 'customer_not_available' })).toBeNull();
    expect(signatureChoiceRefusal({ kind: 'signed' })).toBeNull();
    // The close body leaves it optional (a missing choice is the 422 above, not a 400).
    expect(closeVisitSchema.safeParse({ outcome: 'resolved' }).success).toBe(true);
  });

  it('needs a printed name and PNG data when signed, and nothing else when not available', () => {
    expect(closeSignatureSchema.safeParse({ kind: 'signed', signerName: ' Dana Whitfield ', imagePng: pngStart }).data).toEqual({
      kind: 'signed',
      signerName: 'Dana Whitfield',
      imagePng: pngStart,
    });
    expect(closeSignatureSchema.safeParse({ kind: 'signed', signerName: '', imagePng: pngStart }).error?.issues[0]?.message).toBe(
      'Enter the name of the person signing',
    );
    expect(closeSignatureSchema.safeParse({ kind: 'signed', signerName: 'Dana', imagePng: '' }).error?.issues[0]?.message).toBe(
      'Draw the signature on the pad',
    );
    // JPEG's start of image (FF D8 FF) is not a PNG.
    expect(
      closeSignatureSchema.safeParse({
        kind: 'signed',
        signerName: 'Dana',
        imagePng: Buffer.from([0xff, 0xd8, 0xff, 0xe0]).toString('base64'),
      }).success,
    ).toBe(false);
    expect(
      closeSignatureSchema.safeParse({ kind: 'signed', signerName: 'Dana', imagePng: `data:image/png;base64,${pngStart}` }).success,
    ).toBe(false);
    // 200 KB of bytes is 273,068 base64 characters (4 per 3 bytes, rounded up to a whole group).
    expect(
      closeSignatureSchema.safeParse({
        kind: 'signed',
        signerName: 'Dana',
        imagePng: pngStart + 'A'.repeat(4 * Math.ceil(signatureMaxBytes / 3)),
      }).success,
    ).toBe(false);
    expect(closeSignatureSchema.safeParse({ kind: 'customer_not_available' }).success).toBe(true);
    expect(closeSignatureSchema.safeParse({ kind: 'customer_not_available', signerName: 'Dana' }).success).toBe(false);
  });
});
