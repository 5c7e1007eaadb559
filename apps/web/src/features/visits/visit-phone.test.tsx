// @vitest-environment jsdom
/**
 * The Visit screen one-handed on a phone: "Enter" moves to the next field, the refrigerant form's circuit
 * picker (only on a unit with several circuits, and the entry it queues names the circuit), each circuit's
 * sticky summary of computed values, and the thumbnails of photos waiting in the outbox (object URLs made
 * from the queued bytes and released when they go). Rendered in jsdom with testing-library; the outbox runs
 * on its in-memory store with the connection off, so nothing is sent.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { cleanup, render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { useState, type ReactNode } from 'react';
import { onlineManager, QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { readingUnitsBySystem, type VisitDetail, type VisitUnitDto } from '@coilpath/contract';
import { NoticesProvider } from '@/components/ui/notices';
import { connectOutbox } from '@/lib/visit-outbox';
import type { VisitDraft } from './draft';
import { ReadingsSection } from './readings-section';
import { RefrigerantSection } from './refrigerant-section';
import { CircuitSummary } from './circuit-summary';
import { QueuedThumb } from './queued-thumb';

const id = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;

const unit = (n: number, circuits: number): VisitUnitDto => ({
  id: id(100 + n),
  tag: `RTU-${n}`,
  kind: 'rooftop_unit',
  make: 'Testmake',
  model: 'TM-1',
  serial: `S-${n}`,
  refrigerant: 'R-410A',
  fullChargeLb: 20,
  applianceCategory: 'comfort_cooling',
  circuits: Array.from({ length: circuits }, (_, i) => ({
    id: id(200 + n * 10 + i),
    number: i + 1,
    compressorCount: 1,
    chargeLb: 10,
    targets: { superheat: null, subcooling: null, source: null },
  })),
});

const visitWith = (units: VisitUnitDto[]): VisitDetail =>
  ({
    id: id(1),
    branchId: id(2),
    status: 'on_site',
    techId: id(3),
    techName: 'Test Technician',
    enRouteAt: null,
    onSiteAt: '2026-12-01T15:00:00.000Z',
    closedAt: null,
    outcome: null,
    returnNeeds: [],
    returnNotes: null,
    notes: null,
    notesAudience: 'internal',
    rootCauseFindingId: null,
    leakRepair: null,
    summarySentAt: null,
    version: 1,
    booking: null,
    workOrder: {
      id: id(4),
      number: 1001,
      kind: 'service_call',
      state: 'in_progress',
      priority: 'normal',
      complaint: '',
      requiredCertification: null,
      latestAt: null,
      modelAlert: null,
    },
    site: { id: id(5), name: 'Test site', address: '1 Test Street', city: '', accessNotes: null, contactName: null, contactPhone: null },
    branch: {
      id: id(2),
      name: 'Test branch',
      timeZone: 'America/Chicago',
      unitSystem: 'imperial',
      sensorTolerancePercent: 3,
      sensorToleranceAbsolute: 5,
      elevationMeters: 0,
    },
    units,
    readings: [],
    findings: [],
    refrigerantEvents: [],
    attachments: [],
    events: [],
    canWrite: true,
    canRecord: true,
    recordRefusal: null,
  }) as unknown as VisitDetail;

const emptyDraft: VisitDraft = { readings: {}, readingsDirty: false, findings: [], refrigerant: [], savedAt: null };

function renderWith(node: (qc: QueryClient) => ReactNode) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  render(
    <QueryClientProvider client={qc}>
      <NoticesProvider>{node(qc)}</NoticesProvider>
    </QueryClientProvider>,
  );
  return qc;
}

/** The readings form with its draft held in state, as the Visit screen holds it. */
function Readings({ visit }: { visit: VisitDetail }) {
  const [draft, setDraft] = useState(emptyDraft);
  return <ReadingsSection visit={visit} draft={draft} update={(fn) => setDraft(fn)} />;
}

beforeEach(() => onlineManager.setOnline(false));
afterEach(() => {
  cleanup();
  onlineManager.setOnline(true);
  vi.restoreAllMocks();
});

describe('"Enter" in a reading moves to the next field', () => {
  it('goes through the circuit’s readings in order, then to "Save readings"; the keyboard says next, then done', async () => {
    const user = userEvent.setup();
    renderWith(() => <Readings visit={visitWith([unit(1, 1)])} />);
    const suction = screen.getByLabelText('Suction pressure, circuit 1 (psig)');
    const controller = screen.getByLabelText('Suction pressure on the controller, circuit 1 (psig)');
    const lastField = screen.getByLabelText('Discharge pressure on the controller, circuit 1 (psig)');
    expect(suction.getAttribute('inputmode')).toBe('decimal');
    expect(suction.getAttribute('enterkeyhint')).toBe('next');
    expect(lastField.getAttribute('enterkeyhint')).toBe('done');

    await user.click(suction);
    await user.keyboard('111.5{Enter}');
    expect(document.activeElement).toBe(controller);
    // The ± key between fields is a button, not a stop on the way.
    await user.keyboard('{Enter}');
    expect(document.activeElement).toBe(screen.getByLabelText('Suction line temperature, circuit 1 (°F)'));
    await user.click(lastField);
    await user.keyboard('{Enter}');
    expect(document.activeElement).toBe(screen.getByRole('button', { name: 'Save readings' }));
    // What was typed stays; Enter saved nothing on its own.
    expect((suction as HTMLInputElement).value).toBe('111.5');
  });

  it('crosses from one circuit to the next', async () => {
    const user = userEvent.setup();
    renderWith(() => <Readings visit={visitWith([unit(1, 2)])} />);
    await user.click(screen.getByLabelText('Discharge pressure on the controller, circuit 1 (psig)'));
    await user.keyboard('{Enter}');
    expect(document.activeElement).toBe(screen.getByLabelText('Suction pressure, circuit 2 (psig)'));
  });

  it('in the refrigerant form, moves through the fields and submits from the last one', async () => {
    const user = userEvent.setup();
    const qc = renderWith(() => <RefrigerantSection visit={visitWith([unit(1, 1)])} draft={emptyDraft} update={() => {}} />);
    const added = screen.getByLabelText('Pounds added (lb)');
    expect(added.getAttribute('enterkeyhint')).toBe('next');
    await user.click(added);
    await user.keyboard('2.5{Enter}');
    expect(document.activeElement).toBe(screen.getByLabelText('Pounds recovered (lb)'));
    expect(connectOutbox(qc).list()).toHaveLength(0);
    const lot = screen.getByLabelText('Cylinder or lot number');
    expect(lot.getAttribute('enterkeyhint')).toBe('go');
    await user.click(lot);
    await user.keyboard('LOT-7{Enter}');
    await waitFor(() => expect(connectOutbox(qc).list()).toHaveLength(1));
  });
});

describe('the refrigerant form’s circuit picker', () => {
  it('is not shown for a unit with one circuit, and the entry names no circuit', async () => {
    const user = userEvent.setup();
    const qc = renderWith(() => <RefrigerantSection visit={visitWith([unit(1, 1)])} draft={emptyDraft} update={() => {}} />);
    expect(screen.queryByLabelText('Circuit')).toBeNull();
    await user.type(screen.getByLabelText('Pounds added (lb)'), '2');
    await user.click(screen.getByRole('button', { name: 'Save refrigerant' }));
    await waitFor(() => expect(connectOutbox(qc).list()).toHaveLength(1));
    const w = connectOutbox(qc).list()[0]!.write;
    expect(w.kind === 'refrigerant' && 'circuit' in w.body).toBe(false);
  });

  it('lists a multi-circuit unit’s circuits, says the leak rate stays per appliance, and queues the chosen circuit', async () => {
    const user = userEvent.setup();
    const two = unit(1, 2);
    const qc = renderWith(() => <RefrigerantSection visit={visitWith([two])} draft={emptyDraft} update={() => {}} />);
    const picker = screen.getByLabelText('Circuit') as HTMLSelectElement;
    expect([...picker.options].map((o) => o.value)).toEqual(['', '1', '2']);
    expect(picker.getAttribute('aria-describedby')).toBeTruthy();
    expect(document.getElementById(picker.getAttribute('aria-describedby')!)!.textContent).toMatch(/leak rate stays per appliance/);
    await user.selectOptions(picker, '2');
    await user.type(screen.getByLabelText('Pounds added (lb)'), '3.5');
    await user.click(screen.getByRole('button', { name: 'Save refrigerant' }));
    await waitFor(() => expect(connectOutbox(qc).list()).toHaveLength(1));
    const w = connectOutbox(qc).list()[0]!.write;
    expect(w.kind).toBe('refrigerant');
    if (w.kind !== 'refrigerant') return;
    expect(w.unitId).toBe(two.id);
    expect(w.body.circuit).toBe(2);
    expect(w.body.poundsAdded).toBe(3.5);
  });

  it('follows the chosen unit: shown for the multi-circuit one only, and reset when the unit changes', async () => {
    const user = userEvent.setup();
    renderWith(() => <RefrigerantSection visit={visitWith([unit(1, 1), unit(2, 3)])} draft={emptyDraft} update={() => {}} />);
    expect(screen.queryByLabelText('Circuit')).toBeNull();
    await user.selectOptions(screen.getByLabelText('Unit'), id(102));
    const picker = screen.getByLabelText('Circuit') as HTMLSelectElement;
    expect(picker.options).toHaveLength(4);
    await user.selectOptions(picker, '3');
    await user.selectOptions(screen.getByLabelText('Unit'), id(101));
    expect(screen.queryByLabelText('Circuit')).toBeNull();
    await user.selectOptions(screen.getByLabelText('Unit'), id(102));
    expect((screen.getByLabelText('Circuit') as HTMLSelectElement).value).toBe('');
  });
});

describe('a circuit’s sticky summary', () => {
  /**
   * Check values: CoolProp 8.0.0 reference points for R-410A (tests/reference/data/refrigerant-saturation.json,
   * as in the technician journey): 111.5 psig → dew 36.93 °F; 289.2 psig → bubble 93.33 °F. Superheat
   * 48 − 36.93 = 11.07 °F; subcooling 93.33 − 83 = 10.33 °F. Coilpath's tables are held to ±0.3 °F of them
   * (tests/reference/refrigerant-saturation.test.ts); the bar shows 0.1 °F.
   */
  const values = { suctionPressure: '111.5', suctionLineTemp: '48', liquidPressure: '289.2', liquidLineTemp: '83' };
  const figure = (name: string) => Number(/^(-?\d+\.\d) °F$/.exec(screen.getByRole('status', { name }).textContent!)![1]);
  const branch = { sensorTolerancePercent: 3, sensorToleranceAbsolute: 5, elevationMeters: 0 };

  it('shows dew and bubble points, superheat and subcooling from what is typed', () => {
    render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={values}
        units={readingUnitsBySystem.imperial}
        branch={branch}
      />,
    );
    expect(Math.abs(figure('Suction saturation, circuit 1') - 36.93)).toBeLessThanOrEqual(0.35);
    expect(Math.abs(figure('Superheat, circuit 1') - 11.07)).toBeLessThanOrEqual(0.35);
    expect(Math.abs(figure('Liquid saturation, circuit 1') - 93.33)).toBeLessThanOrEqual(0.35);
    expect(Math.abs(figure('Subcooling, circuit 1') - 10.33)).toBeLessThanOrEqual(0.35);
    // Sticky under the header, so it stays in view while the fields scroll.
    expect(screen.getByRole('group', { name: 'Computed values, circuit 1' }).className).toMatch(/\bsticky\b/);
  });

  it('shows a dash until both values of a pair are typed, and the controller against the gauge with the branch’s tolerance', () => {
    // 118 − 111.5 = +6.5 psi, 5.8 % of 111.5: outside both 5 psi and 3 % (the branch's tolerance); 112 − 111.5 = +0.5 psi: within.
    render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={{
          suctionPressure: '111.5',
          suctionPressureController: '118',
          dischargePressure: '300',
          dischargePressureController: '300.5',
        }}
        units={readingUnitsBySystem.imperial}
        branch={branch}
      />,
    );
    expect(screen.getByRole('status', { name: 'Superheat, circuit 1' }).textContent).toBe('—');
    expect(screen.getByRole('status', { name: 'Subcooling, circuit 1' }).textContent).toBe('—');
    const sensors = within(screen.getByRole('list', { name: 'Controller against gauge, circuit 1' }))
      .getAllByRole('listitem')
      .map((li) => li.textContent);
    expect(sensors).toEqual(['Suction controller +6.5 psi, 5.8 % · outside', 'Discharge controller +0.5 psi, 0.2 % · within']);
  });

  it('shows the circuit’s target ranges and, once computed, below / within / above in words', () => {
    // Superheat ≈ 11.1 °F against 8–12 °F: within; subcooling ≈ 10.3 °F against 12–15 °F: below.
    const targets = { superheat: { min: 8, max: 12 }, subcooling: { min: 12, max: 15 }, source: 'Nameplate' };
    const { unmount } = render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={values}
        units={readingUnitsBySystem.imperial}
        branch={branch}
        targets={targets}
        targetsUnit="F"
      />,
    );
    const lines = () =>
      within(screen.getByRole('list', { name: 'Target ranges, circuit 1' }))
        .getAllByRole('listitem')
        .map((li) => li.textContent);
    expect(lines()).toEqual(['Superheat target 8.0–12.0 °F · within target', 'Subcooling target 12.0–15.0 °F · below target']);
    unmount();
    // Nothing typed yet: the ranges alone, no verdict. An SI screen shows the °F ranges in kelvin (8–12 °F = 4.4–6.7 K).
    render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={{}}
        units={readingUnitsBySystem.si}
        branch={branch}
        targets={targets}
        targetsUnit="F"
      />,
    );
    expect(lines()).toEqual(['Superheat target 4.4–6.7 K', 'Subcooling target 6.7–8.3 K']);
  });

  it('a superheat above its range says so; a circuit without ranges shows none', () => {
    const { unmount } = render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={values}
        units={readingUnitsBySystem.imperial}
        branch={branch}
        targets={{ superheat: { min: 5, max: 10 }, subcooling: null, source: null }}
        targetsUnit="F"
      />,
    );
    expect(
      within(screen.getByRole('list', { name: 'Target ranges, circuit 1' }))
        .getAllByRole('listitem')
        .map((li) => li.textContent),
    ).toEqual(['Superheat target 5.0–10.0 °F · above target']);
    unmount();
    render(
      <CircuitSummary
        title="Circuit 1"
        where="circuit 1"
        refrigerant="R-410A"
        values={values}
        units={readingUnitsBySystem.imperial}
        branch={branch}
        targets={{ superheat: null, subcooling: null, source: null }}
        targetsUnit="F"
      />,
    );
    expect(screen.queryByRole('list', { name: 'Target ranges, circuit 1' })).toBeNull();
  });

  it('is on the readings form for every circuit, and follows the typing', async () => {
    const user = userEvent.setup();
    renderWith(() => <Readings visit={visitWith([unit(1, 2)])} />);
    expect(screen.getAllByTestId('circuit-summary')).toHaveLength(2);
    await user.type(screen.getByLabelText('Suction pressure, circuit 2 (psig)'), '111.5');
    await user.type(screen.getByLabelText('Suction line temperature, circuit 2 (°F)'), '48');
    expect(Math.abs(figure('Superheat, circuit 2') - 11.07)).toBeLessThanOrEqual(0.35);
    expect(screen.getByRole('status', { name: 'Superheat, circuit 1' }).textContent).toBe('—');
  });
});

describe('photos waiting in the outbox', () => {
  it('show from an object URL of the queued bytes, released when the thumbnail goes', () => {
    const made: string[] = [];
    const create = vi.fn((_: Blob) => {
      made.push(`blob:test/${made.length + 1}`);
      return made[made.length - 1]!;
    });
    const revoke = vi.fn();
    vi.stubGlobal('URL', Object.assign(URL, { createObjectURL: create, revokeObjectURL: revoke }));
    const png = new Blob([new Uint8Array([137, 80, 78, 71])], { type: 'image/png' });
    const { rerender, unmount } = render(<QueuedThumb file={png} fileName="wiring.png" kind="photo" />);
    const img = screen.getByRole('img', { name: 'Photo waiting to send: wiring.png' });
    expect(create).toHaveBeenCalledWith(png);
    expect(img.getAttribute('src')).toBe(made[made.length - 1]);
    // The outbox reads its entries back as new Blobs of the same bytes: the thumbnail keeps its URL.
    rerender(
      <QueuedThumb file={new Blob([new Uint8Array([137, 80, 78, 71])], { type: 'image/png' })} fileName="wiring.png" kind="photo" />,
    );
    expect(screen.getByRole('img').getAttribute('src')).toBe(img.getAttribute('src'));
    const live = made.filter((u) => !revoke.mock.calls.some(([r]) => r === u));
    expect(live).toEqual([img.getAttribute('src')]);
    unmount();
    expect(made.every((u) => revoke.mock.calls.some(([r]) => r === u))).toBe(true);
  });

  it('a PDF shows as a file, with no object URL made', () => {
    const create = vi.fn(() => 'blob:test/pdf');
    vi.stubGlobal('URL', Object.assign(URL, { createObjectURL: create, revokeObjectURL: vi.fn() }));
    render(<QueuedThumb file={new Blob(['%PDF-1.7'], { type: 'application/pdf' })} fileName="quote.pdf" kind="document" />);
    expect(screen.queryByRole('img')).toBeNull();
    expect(screen.getByText('quote.pdf')).toBeTruthy();
    expect(create).not.toHaveBeenCalled();
  });
});
