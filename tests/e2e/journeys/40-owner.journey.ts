/**
 * Owner, on a desktop (1440×900): signs in through the form, sees the owner's navigation (with the
 * branch switcher), then on Fix Quality:
 *  - reads the first-time-fix rate;
 *  - opens the factory-defect review (demo: a wiring fault on the Quellmark QRX-20) and its cost;
 *  - creates inspection work orders for the units at risk from the model alert, and sees that none
 *    are left to create, even after reloading;
 *  - exports the factory-defect cases as CSV and reads the file;
 *  - on Mail outbox, downloads the service summary the technician's customer signed and reads the signer's
 *    name and the signature image in its PDF;
 * and finally visits every screen in the navigation.
 */
import assert from 'node:assert/strict';
import { readFile } from 'node:fs/promises';
import type { Page } from 'playwright-core';
import type { JourneyContext } from '../harness';
import { desktop } from '../harness';
import { expectedNavigation, navigationLabels, signInThroughForm, visitEveryScreen } from '../support';
import { readHandoff } from '../handoff';
import { pdfImageCount, readPdf } from '../../../apps/api/src/testing/pdf-text';

export const title = 'Owner on a desktop';

const MODEL = 'Quellmark QRX-20';

/** A card of the page (a `section` headed by an h2 of this name). */
const card = (page: Page, heading: string) =>
  page.locator('section').filter({ has: page.getByRole('heading', { level: 2, name: heading, exact: true }) });

async function readFirstTimeFixRate(ctx: JourneyContext, page: Page) {
  const ftf = page.getByRole('region', { name: 'First-time-fix rate' });
  await ftf.waitFor();
  const value = (await ftf.locator('p').first().innerText()).trim();
  assert.match(value, /^\d+(\.\d)? %$/, `the first-time-fix rate is a percentage (${value})`);
  const rate = Number.parseFloat(value);
  assert.ok(rate >= 0 && rate <= 100, `the rate is between 0 and 100 % (${value})`);
  const explain = await ftf.innerText();
  const m = /(\d+) of (\d+) service calls were resolved on the first visit/.exec(explain);
  assert.ok(m, `the card explains the count (${explain})`);
  const [fixed, eligible] = [Number(m[1]), Number(m[2])];
  assert.ok(eligible > 0, 'the demo has service calls in the last 12 months');
  // The headline agrees with the counts it explains (rounded to one decimal).
  assert.ok(Math.abs((fixed / eligible) * 100 - rate) <= 0.05 + 1e-9, `${fixed} of ${eligible} is ${value}`);
  ctx.step(`first-time-fix rate ${value} (${fixed} of ${eligible} service calls)`);
}

async function reviewFactoryDefects(ctx: JourneyContext, page: Page) {
  const review = card(page, 'Factory-defect review');
  const models = review.getByRole('table', { name: 'Factory-defect cost by make and model' });
  const row = models.getByRole('row').filter({ hasText: MODEL });
  await row.waitFor();
  const cells = (await row.getByRole('cell').allInnerTexts()).map((t) => t.trim());
  const headers = (await models.getByRole('columnheader').allTextContents()).map((t) => t.replace(/\s+/g, ' ').trim());
  const cell = (name: string) => {
    const i = headers.findIndex((h) => h.startsWith(name));
    assert.ok(i >= 0, `the model table has a ${name} column (${headers.join(' | ')})`);
    return cells[i]!;
  };
  assert.equal(cell('Make and model'), MODEL);
  const cases = /^(\d+) \((\d+) callbacks?, (\d+) return visits?, (\d+) first visits?\)$/.exec(cell('Cases'));
  assert.ok(cases, `the Cases column counts callbacks (${cell('Cases')})`);
  assert.ok(Number(cases[2]) >= 1, `the ${MODEL} had callbacks (${cell('Cases')})`);
  const cost = cell('Cost');
  assert.match(cost, /^\$[\d,]+$/, `the cost is an amount of money (${cost})`);
  assert.ok(Number(cost.replace(/[$,]/g, '')) > 0, `the defects cost something (${cost})`);

  // Each case names the unit, its cause and its cost, with a warranty claim to record.
  const caseTable = review.getByRole('table', { name: 'Factory-defect cases and their warranty claims' });
  const modelCases = caseTable.locator('tbody tr').filter({ hasText: MODEL });
  assert.ok((await modelCases.count()) >= 1, `the ${MODEL} cases are listed`);
  const first = await modelCases.first().innerText();
  assert.match(first, /Wiring/i, `the case gives its cause (${first})`);
  assert.match(first, /Callback|Return visit/, 'the case is a callback or a return visit');
  assert.match(first, /\$[\d,]+/, 'the case has a cost');
  ctx.step(`factory-defect review: ${MODEL}, ${cell('Cases')}, cost ${cost}`);
  await review.scrollIntoViewIfNeeded();
  await ctx.screen(page, 'factory-defect-review');
}

async function createInspections(ctx: JourneyContext, page: Page) {
  const alerts = card(page, 'Model alerts');
  const alert = alerts.getByRole('article').filter({ has: page.getByRole('heading', { level: 3, name: new RegExp(`on ${MODEL}$`) }) });
  await alert.waitFor();
  assert.equal(await alert.count(), 1, `one model alert on the ${MODEL}`);
  assert.match(await alert.getByRole('heading', { level: 3 }).innerText(), /Wiring/i, 'the alert names the wiring fault');
  const atRisk = alert.getByRole('table', { name: `Units of ${MODEL} not yet checked` }).locator('tbody tr');
  const n = await atRisk.count();
  assert.ok(n >= 1, 'the alert lists the units not yet checked');

  const create = alert.getByRole('button', { name: `Create ${n} inspection${n === 1 ? '' : 's'}` });
  await create.click();
  const notice = page.locator('[aria-live="polite"] [role="status"]').filter({ hasText: /Created \d+ inspection work orders?/ });
  await notice.waitFor();
  const said = (await notice.innerText()).trim();
  assert.match(
    said,
    new RegExp(`Created ${n} inspection work order${n === 1 ? '' : 's'} \\(.+ in .+\\)\\. They wait in each branch’s Roster queue\\.`),
    said,
  );
  const perBranch = [...said.matchAll(/(\d+) in [^,)]+/g)].reduce((sum, x) => sum + Number(x[1]), 0);
  assert.equal(perBranch, n, `the branches' counts add up to ${n} (${said})`);
  ctx.step(said);

  // Nothing is left to create: the button is gone and every unit of the model is checked.
  await alert.getByText('All checked').waitFor();
  assert.equal(await alert.getByRole('button', { name: /^Create \d+ inspections?$/ }).count(), 0, 'no second batch can be created');
  assert.match(await alert.innerText(), new RegExp(`${n} inspections? open`), 'the alert counts the open inspections');
  await ctx.screen(page, 'model-alert-inspections-created');

  // A second attempt after reloading finds none left (the server remembers them).
  await page.reload();
  await page.getByRole('heading', { level: 1, name: 'Fix Quality' }).waitFor();
  const again = card(page, 'Model alerts').getByRole('article').filter({ hasText: MODEL });
  await again.getByText('All checked').waitFor();
  assert.equal(
    await again.getByRole('button', { name: /^Create \d+ inspections?$/ }).count(),
    0,
    'after a reload there is still nothing to create',
  );
}

async function exportDefectCsv(ctx: JourneyContext, page: Page) {
  const review = card(page, 'Factory-defect review');
  await review.getByRole('table', { name: 'Factory-defect cost by make and model' }).waitFor();
  const [download] = await Promise.all([page.waitForEvent('download'), review.getByRole('link', { name: 'CSV' }).click()]);
  assert.match(download.suggestedFilename(), /\.csv$/, `a CSV file (${download.suggestedFilename()})`);
  const path = await download.path();
  assert.ok(path, 'the download finished');
  const text = (await readFile(path, 'utf8')).replace(/^\uFEFF/, '');
  const lines = text.split(/\r?\n/).filter((l) => l.length > 0);
  assert.equal(
    lines[0],
    'work_order,kind,branch,site,unit,make,model,causes,opened_at,visits,labour_hours,labour_cost,refrigerant_lb,refrigerant_cost,cost,currency,claim_status,claim_amount,claim_difference,claim_reference',
    'the CSV starts with its header row',
  );
  const rows = lines.slice(1);
  assert.ok(rows.length >= 1, 'the CSV has at least one case');
  const qrx = rows.filter((r) => r.includes(',Quellmark,QRX-20,'));
  assert.ok(qrx.length >= 1, `the CSV lists the ${MODEL} cases`);
  for (const r of rows) assert.match(r, /^WO-\d+,/, `each row starts with its work order (${r})`);
  // The cases shown on screen are the rows of the file.
  const shown = await review.getByRole('table', { name: 'Factory-defect cases and their warranty claims' }).locator('tbody tr').count();
  assert.equal(rows.length, shown, 'one CSV row per case on screen');
  ctx.step(`exported ${download.suggestedFilename()}: ${rows.length} case(s), ${qrx.length} on the ${MODEL}`);
}

/**
 * The service summary the technician's journey signed (handed over in test-results/e2e/handoff.json): on
 * Mail outbox the owner opens the message, downloads its PDF and reads it with a general-purpose PDF reader
 * (pdfjs-dist): the signer's name is in the text and the signature is an image on the page.
 */
async function signedSummaryInOutbox(ctx: JourneyContext, page: Page) {
  const signed = readHandoff().signedSummary;
  if (!signed) {
    ctx.step('no signed close-out from the technician journey in this run: the outbox PDF check needs 10-technician first');
    return;
  }
  await page.getByRole('link', { name: 'Mail outbox' }).first().click();
  await page.getByRole('heading', { level: 1, name: 'Mail outbox' }).waitFor();
  const message = page.getByRole('button', { name: new RegExp(`^Service summary WO-${signed.workOrderNumber} `) }).first();
  await message.click();
  const attachment = page
    .getByRole('list', { name: 'Attachments' })
    .getByRole('link', { name: new RegExp(`service-summary-WO-${signed.workOrderNumber}\\.pdf`) });
  await attachment.waitFor();
  const [download] = await Promise.all([page.waitForEvent('download'), attachment.click()]);
  const path = await download.path();
  assert.ok(path, 'the PDF downloaded');
  const bytes = await readFile(path);
  const pdf = await readPdf(bytes);
  assert.ok(pdf.flat.includes('Customer sign-off'), 'the PDF has the sign-off section');
  assert.ok(pdf.flat.includes(`Signed by ${signed.signerName}`), `the PDF names the signer (${signed.signerName})`);
  assert.match(
    pdf.flat,
    /Signed \w{3} \d{1,2} \w{3} \d{4}, \d\d:\d\d C[SD]T/,
    'the PDF gives the signing time in the branch’s zone (Chicago)',
  );
  const images = await pdfImageCount(bytes);
  assert.equal(images, 1, 'the PDF draws the signature image');
  // The message is open and its PDF read: screenshot and axe now (a page with a downloaded attachment may not reach "network idle").
  await ctx.screenshot(page, 'mail-outbox-signed-summary');
  await ctx.axe(page, 'mail-outbox-signed-summary');
  ctx.step(
    `Mail outbox: the summary of WO-${signed.workOrderNumber} carries ${signed.signerName}'s signature (${images} image, name and time in the text)`,
  );
}

export async function run(ctx: JourneyContext) {
  const page = await ctx.launch(desktop);
  await signInThroughForm(ctx, page, 'owner');
  const labels = await navigationLabels(page);
  assert.deepEqual(labels, expectedNavigation('owner', 'desktop'), 'the owner sees every office screen');
  assert.equal(await page.getByRole('combobox', { name: 'Branch' }).count(), 1, 'the owner can switch branches');
  await page.getByRole('heading', { level: 1, name: 'Fix Quality' }).waitFor();
  await ctx.screen(page, 'fix-quality');

  await readFirstTimeFixRate(ctx, page);
  await reviewFactoryDefects(ctx, page);
  await createInspections(ctx, page);
  await exportDefectCsv(ctx, page);

  await visitEveryScreen(ctx, page, labels);
  await signedSummaryInOutbox(ctx, page);
}
