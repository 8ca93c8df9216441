// `npm run load` (through tests/load/run.sh, which starts a throwaway stack): the full-size load run.
import { openOrm } from '../../server/db/orm';
import { formatReport, runLoad } from './load';

async function main(): Promise<void> {
  const url = process.env.INFALL_LOAD_URL;
  if (!url || !/^http:\/\/127\.0\.0\.1:\d+$/.test(url)) throw new Error('INFALL_LOAD_URL must be http://127.0.0.1:PORT (loopback only)');
  const json = process.argv.includes('--json');
  const orm = await openOrm();
  try {
    const report = await runLoad({
      url,
      orm,
      // Shorter or smaller with INFALL_LOAD_SECONDS / INFALL_LOAD_CONNECTIONS, when trying things out.
      seconds: Number(process.env.INFALL_LOAD_SECONDS ?? 30),
      connections: Number(process.env.INFALL_LOAD_CONNECTIONS ?? 200),
      watchers: 300,
      submissions: 100,
      people: 20,
      settleSeconds: 180,
      log: (l) => console.error(l),
    });
    console.log(json ? JSON.stringify(report, null, 2) : formatReport(report));
    if (report.submissions.notFinal > 0 || report.submissions.errors > 0) process.exitCode = 1;
  } finally {
    await orm.close();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
