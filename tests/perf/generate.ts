/**
 * `npm run bench:data`: builds the large benchmark scenario (tests/perf/scenario.ts) into its own PGlite
 * directory (data/bench, or COILPATH_BENCH_DIR), or into the PostgreSQL database named by BENCH_DATABASE_URL.
 * Never touches the demo data. `--force` deletes the PGlite copy and loads it again.
 */
import { benchDataDir, loadBenchScenario, openBenchDatabase } from './load';

const force = process.argv.includes('--force');
const url = process.env.BENCH_DATABASE_URL;
const database = await openBenchDatabase(url, force && !url);
try {
  const t0 = Date.now();
  const meta = await loadBenchScenario(database);
  const fresh = Date.now() - t0 > 5_000;
  const where = url ? 'PostgreSQL (BENCH_DATABASE_URL)' : benchDataDir();
  console.log(
    fresh
      ? `Loaded the benchmark scenario into ${where} in ${meta.seconds} s:`
      : `The benchmark scenario is already in ${where} (use --force to load it again):`,
  );
  for (const [table, n] of Object.entries(meta.rows)) console.log(`  ${table.padEnd(20)} ${n.toLocaleString('en-US').padStart(10)}`);
} finally {
  await database.close();
}
