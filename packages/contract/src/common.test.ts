import { describe, expect, it } from 'vitest';
import { oneLine, oneLineMessage, optionalOneLine } from './common';
import { acceptInvitationSchema, branchInputSchema, userProfileSchema } from './team';
import { siteInputSchema } from './sites';
import { ownerSetupSchema } from './auth';
import { workOrderCreateSchema } from './work-orders';
import { agreementInputSchema } from './agreements';
import { bookingCreateSchema } from './roster';
import { alarmSourceCreateSchema } from './alarm-sources';

describe('one-line fields refuse control characters', () => {
  const name = oneLine(120, 'Enter the name');

  it.each([
    ['CR', 'Dana\rWhitfield'],
    ['LF', 'Dana\nBcc: victim@example.com'],
    ['CRLF', 'Dana\r\nWhitfield'],
    ['NUL', 'Dana\u0000'],
    ['TAB', 'Dana\tWhitfield'],
    ['ESC (another C0)', 'Dana\u001b[31m'],
    ['DEL', 'Dana\u007f'],
    ['NEL (C1)', 'Dana\u0085Whitfield'],
  ])('refuses %s inside the text, saying why', (_, text) => {
    const r = name.safeParse(text);
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.message).toBe(oneLineMessage);
  });

  it('keeps ordinary text, accents and other scripts, and trims the ends', () => {
    expect(name.parse('  José Ñúñez-O’Brien  ')).toBe('José Ñúñez-O’Brien');
    expect(name.parse('渡辺 美咲')).toBe('渡辺 美咲');
    expect(name.safeParse('').success).toBe(false);
    expect(optionalOneLine(40).parse('  ')).toBeNull();
    expect(optionalOneLine(40).safeParse('555\n0100').success).toBe(false);
  });

  it('is what the name fields of people, branches, sites, invitations and the first owner use', () => {
    const bad = 'Line one\r\nLine two';
    const fieldError = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }, path: string) =>
      r.error?.issues.find((i) => i.path.join('.') === path)?.message;
    expect(fieldError(userProfileSchema.safeParse({ name: bad, role: 'owner' }), 'name')).toBe(oneLineMessage);
    expect(fieldError(branchInputSchema.safeParse({ name: bad }), 'name')).toBe(oneLineMessage);
    expect(fieldError(siteInputSchema.safeParse({ name: bad }), 'name')).toBe(oneLineMessage);
    expect(fieldError(acceptInvitationSchema.safeParse({ token: 'x'.repeat(20), name: bad, password: 'p', confirm: 'p' }), 'name')).toBe(
      oneLineMessage,
    );
    expect(fieldError(ownerSetupSchema.safeParse({ token: 'x'.repeat(20), name: bad }), 'name')).toBe(oneLineMessage);
    expect(fieldError(userProfileSchema.safeParse({ name: 'Ok', role: 'owner', phone: '555\u0000' }), 'phone')).toBe(oneLineMessage);
  });
});

describe('a pick left empty says what to choose', () => {
  const messageAt = (r: { error?: { issues: { path: PropertyKey[]; message: string }[] } }, path: string) =>
    r.error?.issues.find((i) => i.path.join('.') === path)?.message;
  it('names the thing to pick on the forms with a picker, never "Must be an id"', () => {
    expect(messageAt(siteInputSchema.safeParse({ customerId: '' }), 'customerId')).toBe('Choose a customer');
    expect(messageAt(workOrderCreateSchema.safeParse({ siteId: '', kind: 'service_call', complaint: 'x' }), 'siteId')).toBe(
      'Choose a site',
    );
    expect(messageAt(agreementInputSchema.safeParse({ siteId: '' }), 'siteId')).toBe('Choose a site');
    expect(messageAt(bookingCreateSchema.safeParse({ workOrderId: '00000000-0000-4000-8000-000000000001', techId: '' }), 'techId')).toBe(
      'Choose a technician',
    );
    expect(messageAt(alarmSourceCreateSchema.safeParse({ siteId: '', name: 'Roof BMS' }), 'siteId')).toBe('Choose a site');
  });
});
