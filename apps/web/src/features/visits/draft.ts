import { useCallback, useEffect, useState } from 'react';
import type { FindingInput, ReadingUnits, RefrigerantEventInput } from '@coilpath/contract';

/** Field values as typed (strings), per circuit id. */
export type ReadingDraft = Record<string, Record<string, string>>;

export interface PendingRefrigerant {
  unitId: string;
  body: RefrigerantEventInput & { id: string };
}

/**
 * What the technician typed that the server has not confirmed yet. Kept in localStorage per visit
 * until the server answers, so a reload or a dropped connection loses nothing.
 */
export interface VisitDraft {
  readings: ReadingDraft;
  /** The units `readings` were typed in (absent in drafts from before SI: psig/°F). */
  readingsUnits?: ReadingUnits | undefined;
  /** True while `readings` holds values the server has not confirmed. */
  readingsDirty: boolean;
  findings: (FindingInput & { id: string })[];
  refrigerant: PendingRefrigerant[];
  savedAt: string | null;
}

const empty: VisitDraft = { readings: {}, readingsDirty: false, findings: [], refrigerant: [], savedAt: null };
const keyFor = (visitId: string) => `coilpath.visit-draft.${visitId}`;

function load(visitId: string): VisitDraft {
  try {
    const raw = localStorage.getItem(keyFor(visitId));
    return raw ? { ...empty, ...(JSON.parse(raw) as Partial<VisitDraft>) } : empty;
  } catch {
    return empty;
  }
}

export function hasUnsaved(d: VisitDraft): boolean {
  return d.readingsDirty || d.findings.length > 0 || d.refrigerant.length > 0;
}

export function useVisitDraft(visitId: string) {
  const [draft, setDraft] = useState<VisitDraft>(() => load(visitId));
  const [restored] = useState(() => hasUnsaved(load(visitId)));
  // Another visit on the same screen: its own draft.
  const [draftFor, setDraftFor] = useState(visitId);
  if (draftFor !== visitId) {
    setDraftFor(visitId);
    setDraft(load(visitId));
  }
  useEffect(() => {
    try {
      if (hasUnsaved(draft)) localStorage.setItem(keyFor(visitId), JSON.stringify(draft));
      else localStorage.removeItem(keyFor(visitId));
    } catch {
      /* storage full or blocked: the form still works, it just cannot survive a reload */
    }
  }, [visitId, draft]);
  const update = useCallback((fn: (d: VisitDraft) => VisitDraft) => setDraft((d) => fn(d)), []);
  return { draft, update, restored };
}
