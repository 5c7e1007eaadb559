import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { Wordmark } from '@/components/ui/logo';

/** The frame of the pages reached without a session (sign-in's siblings). */
export function PublicShell({ title, children }: { title: string; children: ReactNode }) {
  return (
    <main className="flex min-h-dvh items-center justify-center bg-ink px-4 py-10">
      <div className="w-full max-w-md rounded-xl bg-white p-6 shadow-xl sm:p-8">
        <div className="mb-6 text-2xl">
          <Wordmark />
        </div>
        <h1 className="mb-4 text-xl font-semibold">{title}</h1>
        {children}
        <p className="mt-6 text-sm">
          <Link to="/sign-in" className="text-coolant underline-offset-2 hover:underline">
            Back to sign-in
          </Link>
        </p>
      </div>
    </main>
  );
}

export function Alert({ tone, children }: { tone: 'ok' | 'alarm'; children: ReactNode }) {
  return (
    <p
      role={tone === 'alarm' ? 'alert' : 'status'}
      className={`rounded-md px-3 py-2 text-sm ${tone === 'ok' ? 'bg-ok-tint text-ok' : 'bg-alarm-tint text-alarm'}`}
    >
      {children}
    </p>
  );
}
