import { launchChromium } from '/work/main/tests/e2e/browser';
import { startServer } from '/work/main/tests/support/server-process';
import { mkdtempSync } from 'node:fs';
const server = await startServer({ dataDir: mkdtempSync('/tmp/cp-'), env: { COILPATH_SEED: 'auto', COILPATH_JOBS: 'off' } });
const b = await launchChromium({ width: 390, height: 844 });
const page = b.pages()[0]!;
page.on('console', (m) => console.log('console', m.type(), m.text()));
await page.goto(server.base + '/sign-in');
await page.getByLabel('E-mail').fill('tech@coilpath.example');
await page.getByLabel('Password').fill('coilpath-demo');
await page.getByRole('button', { name: 'Sign in' }).click();
await page.waitForURL((u) => u.pathname === '/day');
await page.waitForTimeout(2000);
await page.goto(server.base + '/day?date=2026-12-04');
await page.waitForTimeout(5000);
console.log(
  await page.evaluate(
    () =>
      new Promise((resolve) => {
        const open = indexedDB.open('coilpath');
        open.onerror = () => resolve('err');
        open.onsuccess = () => {
          const db = open.result;
          const names = [...db.objectStoreNames];
          if (!names.includes('kept-answers')) return resolve('stores ' + names.join(','));
          const get = db.transaction('kept-answers').objectStore('kept-answers').getAllKeys();
          get.onsuccess = () => {
            const g2 = db.transaction('kept-answers').objectStore('kept-answers').get('coilpath.query-cache');
            g2.onsuccess = () =>
              resolve(
                JSON.stringify(get.result) +
                  ' ' +
                  String(g2.result)
                    .match(/"queryKey":\[[^\]]*\]/g)
                    ?.join(' '),
              );
          };
        };
      }),
  ),
);
await b.close();
await server.stop(3000);
