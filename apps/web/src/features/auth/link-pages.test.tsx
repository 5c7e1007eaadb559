/**
 * The pages reached from a one-time link render their form once the link checks out: both password
 * fields, the rule's hint (the contract's minimum), and the e-mail the reset is for.
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { MemoryRouter } from 'react-router-dom';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { limits } from '@coilpath/contract';
import type { ReactNode } from 'react';
import ResetPasswordPage from './reset-password-page';
import OwnerSetupPage from './owner-setup-page';

const TOKEN = 'abcdefghijklmnop';
const render = (node: ReactNode, seed: (qc: QueryClient) => void) => {
  const qc = new QueryClient();
  seed(qc);
  return renderToStaticMarkup(
    <QueryClientProvider client={qc}>
      <MemoryRouter initialEntries={[`/?token=${TOKEN}`]}>{node}</MemoryRouter>
    </QueryClientProvider>,
  );
};
const labels = (html: string) => [...html.matchAll(/<label[^>]*>([^<]*)/g)].map((m) => m[1]!.trim());

describe('pages from a one-time link', () => {
  it('reset: the new password twice, for the address the link belongs to', () => {
    const html = render(<ResetPasswordPage />, (qc) => qc.setQueryData(['reset-check', TOKEN], { email: 'dana@example.test' }));
    expect(labels(html)).toEqual(['New password', 'New password again']);
    expect(html).toContain(`At least ${limits.password.min} characters`);
    expect(html).toContain('dana@example.test');
    expect(html.match(/autoComplete="new-password"|autocomplete="new-password"/gi)).toHaveLength(2);
  });

  it('first owner: name, e-mail and the password twice', () => {
    const html = render(<OwnerSetupPage />, (qc) => qc.setQueryData(['owner-setup-check', TOKEN], { ok: true }));
    expect(labels(html)).toEqual(['Your name', 'E-mail', 'Password', 'Password again']);
    expect(html).toContain(`At least ${limits.password.min} characters`);
  });
});
