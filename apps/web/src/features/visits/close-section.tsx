import { useState } from 'react';
import { onlineManager, useQueryClient } from '@tanstack/react-query';
import { Link } from 'react-router-dom';
import { AlertTriangle, CheckCircle2, MailWarning } from 'lucide-react';
import {
  causeCodeLabels,
  causeOriginLabels,
  noteAudienceLabels,
  noteAudiences,
  returnNeedLabels,
  returnNeeds,
  signatureKindLabels,
  signatureKinds,
  visitOutcomeLabels,
  visitOutcomes,
  workOrderStateLabels,
} from '@coilpath/contract/vocabulary';
import { closeSignatureSchema, leakRepairCloseRefusal, rootCauseChoice, signatureChoiceRefusal } from '@coilpath/contract/visits';
import type {
  CloseVisitResult,
  NoteAudience,
  ReturnNeed,
  CloseSignature,
  SignatureKind,
  SummaryMailResult,
  VisitDetail,
  VisitOutcome,
} from '@coilpath/contract';
import { Button } from '@/components/ui/button';
import { TextAreaField, TextField } from '@/components/ui/field';
import { Card } from '@/components/ui/page';
import { useNotify } from '@/components/ui/notices';
import { errorMessage } from '@/lib/api-client';
import { queueWrite, useOutbox } from '@/lib/visit-outbox';
import { formatInZone } from '@/lib/format';
import { useResendSummary } from './visit-api';
import { SignaturePadField, type DrawnSignature } from './signature-pad';

const outcomeHelp: Record<VisitOutcome, string> = {
  resolved: 'Fixed; nothing more is needed.',
  needs_return: 'More work is needed: a return visit goes to the unplaced queue for the office to book.',
  declined: 'The customer declined the work.',
};

/** A closed visit's sign-off: the signature with the signer's name and time, or that no one could sign. */
function SignOff({ visit }: { visit: VisitDetail }) {
  const sig = visit.signature;
  if (!sig) return null;
  if (sig.kind === 'customer_not_available') return <p>Customer not available to sign.</p>;
  return (
    <figure className="flex flex-col gap-1">
      <img
        src={sig.imageUrl}
        alt={`Signature of ${sig.signerName}`}
        className="h-24 w-full max-w-xs rounded border border-slate-line bg-white object-contain"
      />
      <figcaption>
        Signed by <strong>{sig.signerName}</strong>, {formatInZone(sig.signedAt, visit.branch.timeZone)}
      </figcaption>
    </figure>
  );
}

function SummaryLine({ s, onResend, busy }: { s: SummaryMailResult; onResend(): void; busy: boolean }) {
  return s.sent ? (
    <p className="inline-flex items-center gap-1 text-sm text-ok">
      <CheckCircle2 className="size-4" aria-hidden="true" /> Service summary (with PDF) sent to {s.to}.
    </p>
  ) : (
    <div role="alert" className="flex flex-col items-start gap-2 rounded-md border border-alarm/40 bg-alarm-tint p-3 text-sm">
      <span className="inline-flex items-center gap-1 font-medium text-alarm">
        <MailWarning className="size-4" aria-hidden="true" /> Service summary not sent
      </span>
      <span>{s.error}</span>
      {s.to && (
        <Button variant="secondary" onClick={onResend} busy={busy}>
          Send summary again
        </Button>
      )}
    </div>
  );
}

export function CloseSection({ visit, unsaved }: { visit: VisitDetail; unsaved: boolean }) {
  const notify = useNotify();
  const qc = useQueryClient();
  const { entries } = useOutbox(visit.id);
  const closeWaiting = entries.some((e) => e.write.kind === 'close' && e.state === 'waiting');
  const resend = useResendSummary(visit.id);
  const [outcome, setOutcome] = useState<VisitOutcome | ''>('');
  const [needs, setNeeds] = useState<ReturnNeed[]>([]);
  const [returnNotes, setReturnNotes] = useState('');
  const [notes, setNotes] = useState('');
  const [notesAudience, setNotesAudience] = useState<NoteAudience>('internal');
  const [rootCause, setRootCause] = useState<string>('');
  const [confirmedUnverified, setConfirmedUnverified] = useState(false);
  const [signOff, setSignOff] = useState<SignatureKind | ''>('');
  const [signerName, setSignerName] = useState('');
  const [drawn, setDrawn] = useState<DrawnSignature | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [result, setResult] = useState<CloseVisitResult | null>(null);
  const [summary, setSummary] = useState<SummaryMailResult | null>(null);

  // The server's answer to the close-out once it arrived (return visit, summary e-mail).
  const arrived = (answer: unknown) => {
    const r = answer as CloseVisitResult | undefined;
    if (!r?.visit) return; // a close-out found done on a retry: the visit's own answer says how it closed
    setResult(r);
    notify(
      `Visit closed as ${visitOutcomeLabels[r.visit.outcome ?? 'resolved'].toLowerCase()}.${r.returnWorkOrder ? (r.returnWorkOrder.joined ? ` Added to the open return visit WO-${r.returnWorkOrder.number}.` : ` Return visit WO-${r.returnWorkOrder.number} created.`) : ''}${r.summary.sent ? ` Summary sent to ${r.summary.to}.` : ' The summary e-mail was not sent.'}`,
      r.summary.sent ? 'ok' : 'alarm',
    );
  };

  const doResend = () =>
    resend.mutate(undefined, {
      onSuccess: (s) => {
        setSummary(s);
        notify(s.sent ? `Summary sent to ${s.to}.` : `Summary not sent: ${s.error}`, s.sent ? 'ok' : 'alarm');
      },
      onError: (e) => notify(`Summary not sent: ${errorMessage(e)}`, 'alarm'),
    });

  if (visit.status === 'closed') {
    const s = summary ?? result?.summary ?? (visit.summarySentAt ? null : null);
    return (
      <Card title="Close-out">
        <div className="flex flex-col gap-2 text-sm">
          <p>
            Closed {visit.closedAt ? formatInZone(visit.closedAt, visit.branch.timeZone) : ''} as{' '}
            <strong>{visit.outcome ? visitOutcomeLabels[visit.outcome] : '—'}</strong>
            {visit.outcome === 'needs_return' && visit.returnNeeds.length > 0 && (
              <> — needs {visit.returnNeeds.map((n) => returnNeedLabels[n].toLowerCase()).join(', ')}</>
            )}
            .
          </p>
          <SignOff visit={visit} />
          {result?.returnWorkOrder && (
            <p className="inline-flex items-center gap-1 text-ok">
              <CheckCircle2 className="size-4" aria-hidden="true" />
              {result.returnWorkOrder.joined
                ? `The needs were added to WO-${result.returnWorkOrder.number}, the return visit already open for this unit (${workOrderStateLabels[result.returnWorkOrder.state].toLowerCase()}).`
                : `Return visit WO-${result.returnWorkOrder.number} is in the unplaced queue for the office to book.`}
            </p>
          )}
          {closeWaiting ? (
            <p role="status" className="rounded-md border border-watch-base/40 bg-watch-tint p-3">
              The close-out is kept on this phone and waits to send, after the changes made before it. The service summary goes to the site
              contact once it arrives.
            </p>
          ) : s ? (
            <SummaryLine s={s} onResend={doResend} busy={resend.isPending} />
          ) : visit.summarySentAt ? (
            <p className="inline-flex items-center gap-1 text-ok">
              <CheckCircle2 className="size-4" aria-hidden="true" /> Service summary sent{' '}
              {formatInZone(visit.summarySentAt, visit.branch.timeZone)}.
            </p>
          ) : (
            <SummaryLine
              s={{ sent: false, to: 'the site contact', error: 'The service summary has not been sent.' }}
              onResend={doResend}
              busy={resend.isPending}
            />
          )}
          <p>
            <Link to="/day" className="inline-flex min-h-11 items-center text-coolant underline">
              Back to Route
            </Link>
          </p>
        </div>
      </Card>
    );
  }
  if (!visit.canWrite) return null;

  const notOnSite = visit.status !== 'on_site';
  // The server's rule: a leak repair closed as resolved with no verification test and no refrigerant entry is confirmed in words.
  const unverified = outcome
    ? leakRepairCloseRefusal({
        leakRepair: visit.leakRepair,
        outcome,
        refrigerantEntries: visit.refrigerantEvents.length,
        confirmed: false,
      })
    : null;
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    setError(null);
    if (!outcome) return setError('Choose the outcome of the visit.');
    if (outcome === 'needs_return' && needs.length === 0) return setError('Say what the return visit needs.');
    // The same rule the server applies (`rootCauseChoice`): a choice among several findings.
    const choice = rootCauseChoice(
      visit.findings.map((f) => f.id),
      rootCause || null,
    );
    if (!choice.ok) return setError(choice.message);
    if (unverified && !confirmedUnverified) return setError(unverified.message);
    // The sign-off: one of the two choices (`signatureChoiceRefusal`), and a signed one checked by the same schema as the API's.
    const unsigned = signatureChoiceRefusal(signOff ? { kind: signOff } : null);
    if (unsigned) return setError(unsigned.message);
    const asked: CloseSignature =
      signOff === 'signed'
        ? { kind: 'signed', signerName, imagePng: drawn?.imagePng ?? '', ...(drawn ? { signedAt: drawn.signedAt } : {}) }
        : { kind: 'customer_not_available' };
    const parsed = closeSignatureSchema.safeParse(asked);
    if (!parsed.success) return setError(parsed.error.issues[0]?.message ?? 'Check the signature.');
    const signature = parsed.data;
    // Through the outbox: closed on this phone at once, sent after the visit's earlier changes.
    queueWrite(
      qc,
      {
        kind: 'close',
        visitId: visit.id,
        body: {
          outcome,
          returnNeeds: outcome === 'needs_return' ? needs : [],
          returnNotes: returnNotes.trim() || null,
          notes: notes.trim() || null,
          notesAudience,
          rootCauseFindingId: choice.findingId,
          ...(unverified ? { confirmedWithoutVerification: confirmedUnverified } : {}),
          signature,
        },
      },
      { sent: arrived, stopped: (e) => notify(`Visit not closed: ${e.problem?.message ?? 'refused'}`, 'alarm') },
    ).then(
      () => {
        if (!onlineManager.isOnline()) notify('Visit closed on this phone; the close-out is sent when the connection is back.');
      },
      (err: unknown) => setError(errorMessage(err)),
    );
  };

  return (
    <Card title="Close-out">
      <form onSubmit={submit} noValidate className="flex flex-col gap-4">
        <fieldset>
          <legend className="mb-2 text-sm font-medium">Outcome</legend>
          <div className="flex flex-col gap-2">
            {visitOutcomes.map((o) => (
              <label
                key={o}
                className="flex min-h-12 cursor-pointer items-start gap-3 rounded-md border border-slate-line p-3 has-[:checked]:border-copper has-[:checked]:bg-copper-tint"
              >
                <input
                  type="radio"
                  name="outcome"
                  value={o}
                  checked={outcome === o}
                  onChange={() => setOutcome(o)}
                  className="mt-1 size-5"
                />
                <span>
                  <span className="block font-medium">{visitOutcomeLabels[o]}</span>
                  <span className="block text-sm text-slate">{outcomeHelp[o]}</span>
                </span>
              </label>
            ))}
          </div>
        </fieldset>
        {outcome === 'needs_return' && (
          <fieldset>
            <legend className="mb-2 text-sm font-medium">What the return visit needs</legend>
            <div className="grid grid-cols-2 gap-2">
              {returnNeeds.map((n) => (
                <label key={n} className="flex min-h-12 cursor-pointer items-center gap-3 rounded-md border border-slate-line px-3">
                  <input
                    type="checkbox"
                    className="size-5"
                    checked={needs.includes(n)}
                    onChange={(e) => setNeeds((xs) => (e.target.checked ? [...xs, n] : xs.filter((x) => x !== n)))}
                  />
                  {returnNeedLabels[n]}
                </label>
              ))}
            </div>
            <div className="mt-3">
              <TextAreaField
                label="Return visit notes (parts, who to bring)"
                value={returnNotes}
                onChange={(e) => setReturnNotes(e.target.value)}
              />
            </div>
          </fieldset>
        )}
        {visit.findings.length > 0 && (
          <fieldset>
            <legend className="mb-1 text-sm font-medium">Root cause</legend>
            <p className="mb-2 text-sm text-slate">
              {visit.findings.length > 1
                ? 'Which finding caused the call? Fix Quality counts the call under this one.'
                : 'The one finding is the root cause.'}
            </p>
            <div className="flex flex-col gap-2">
              {visit.findings.map((f) => (
                <label
                  key={f.id}
                  className="flex min-h-12 cursor-pointer items-start gap-3 rounded-md border border-slate-line p-3 has-[:checked]:border-copper has-[:checked]:bg-copper-tint"
                >
                  <input
                    type="radio"
                    name="rootCause"
                    value={f.id}
                    checked={visit.findings.length === 1 ? !rootCause || rootCause === f.id : rootCause === f.id}
                    onChange={() => setRootCause(f.id)}
                    className="mt-1 size-5"
                  />
                  <span>
                    <span className="block font-medium">{causeCodeLabels[f.causeCode]}</span>
                    <span className="block text-sm text-slate">
                      {causeOriginLabels[f.origin]}
                      {f.notes ? ` — ${f.notes}` : ''}
                    </span>
                  </span>
                </label>
              ))}
            </div>
          </fieldset>
        )}
        <TextAreaField label="Visit notes" value={notes} onChange={(e) => setNotes(e.target.value)} />
        <fieldset>
          <legend className="mb-2 text-sm font-medium">Who the notes are for</legend>
          <div className="grid grid-cols-1 gap-2 sm:grid-cols-2">
            {noteAudiences.map((a) => (
              <label
                key={a}
                className="flex min-h-12 cursor-pointer items-center gap-3 rounded-md border border-slate-line px-3 has-[:checked]:border-copper has-[:checked]:bg-copper-tint"
              >
                <input
                  type="radio"
                  name="notesAudience"
                  value={a}
                  checked={notesAudience === a}
                  onChange={() => setNotesAudience(a)}
                  className="size-5"
                />
                {noteAudienceLabels[a]}
              </label>
            ))}
          </div>
          <p className="mt-1 text-xs text-slate">
            Only notes for the customer go into the service summary; return needs, warranty and staffing stay internal.
          </p>
        </fieldset>
        {unverified && (
          <div className="flex flex-col gap-2 rounded-md border border-watch-base/40 bg-watch-tint p-3 text-sm text-ink">
            <p className="inline-flex items-start gap-1">
              <AlertTriangle className="mt-0.5 size-4 shrink-0 text-watch" aria-hidden="true" />
              <span>{unverified.message}</span>
            </p>
            <label className="flex min-h-12 cursor-pointer items-center gap-3">
              <input
                type="checkbox"
                className="size-5"
                checked={confirmedUnverified}
                onChange={(e) => setConfirmedUnverified(e.target.checked)}
              />
              Yes, close the leak repair as resolved without a verification test or refrigerant entry
            </label>
          </div>
        )}
        <fieldset>
          <legend className="mb-1 text-sm font-medium">Customer sign-off</legend>
          <p className="mb-2 text-sm text-slate">
            The customer’s on-site contact signs here; the signature and their name go on the service summary.
          </p>
          <div className="grid grid-cols-1 gap-2 sm:grid-cols-2">
            {signatureKinds.map((k) => (
              <label
                key={k}
                className="flex min-h-12 cursor-pointer items-center gap-3 rounded-md border border-slate-line px-3 has-[:checked]:border-copper has-[:checked]:bg-copper-tint"
              >
                <input type="radio" name="signOff" value={k} checked={signOff === k} onChange={() => setSignOff(k)} className="size-5" />
                {signatureKindLabels[k]}
              </label>
            ))}
          </div>
          {signOff === 'signed' && (
            <div className="mt-3 flex flex-col gap-3">
              <TextField
                label="Signer’s printed name"
                autoComplete="off"
                value={signerName}
                onChange={(e) => setSignerName(e.target.value)}
                maxLength={120}
              />
              <SignaturePadField label="Signature" onChange={setDrawn} />
            </div>
          )}
        </fieldset>
        {unsaved && (
          <p className="inline-flex items-center gap-1 text-sm text-watch">
            <AlertTriangle className="size-4" aria-hidden="true" /> Some entries are not saved yet; they will not be in the summary. Save
            them first.
          </p>
        )}
        {notOnSite && <p className="text-sm text-slate">Mark yourself on site before closing, so the visit’s times are right.</p>}
        {error && (
          <p role="alert" className="text-sm text-alarm">
            {error}
          </p>
        )}
        <Button type="submit" size="lg" disabled={notOnSite || unsaved}>
          Close visit
        </Button>
        <p className="text-xs text-slate">Closing sends the service summary with a PDF copy to the site contact.</p>
      </form>
    </Card>
  );
}
