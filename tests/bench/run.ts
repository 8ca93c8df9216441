// `npm run bench` (through run.sh, which starts a throwaway stack and sets
// INFALL_BENCH_URL). Prints the table, or with --json one JSON object. Without
// INFALL_BENCH_URL only the sections that need no stack run; --stack-only
// skips the others (to re-measure the stack alone).
import { randomBytes } from 'node:crypto';
import { benchPure, benchStackSections, FULL_SIZES, machine, toJson, toTable, type BenchReport } from './bench';
import { benchClient, signInBrowser } from './client';

const CLIENT_PARTICLES = 50_000;

/** The bench user: created by signing in through the fake provider, made a researcher (quota for 5,000 particles), given a token. */
async function benchToken(login: string): Promise<string> {
  const { openOrm } = await import('../../server/db/orm');
  const { User } = await import('../../server/db/entities');
  const { createToken } = await import('../../server/services/tokens');
  const orm = await openOrm();
  try {
    const em = orm.em.fork();
    const user = await em.findOneOrFail(User, { login });
    user.role = 'researcher';
    await em.flush();
    return (await createToken(em, user, { name: 'bench', expiresInDays: 1 })).secret;
  } finally {
    await orm.close();
  }
}

async function main() {
  const json = process.argv.includes('--json');
  const stackOnly = process.argv.includes('--stack-only');
  const report: BenchReport = { ...(stackOnly ? {} : await benchPure(FULL_SIZES)), machine: machine() };
  const url = process.env.INFALL_BENCH_URL;
  let failed = false;
  if (url) {
    const login = `bench-${randomBytes(4).toString('hex')}`;
    process.stderr.write(`[bench] signing in as ${login}\n`);
    const signedIn = await signInBrowser(url, login);
    try {
      const target = { url, token: await benchToken(login) };
      Object.assign(report, await benchStackSections(target, { particles: 2_000, steps: 1_000, bigParticles: 8_000, bigSteps: 1_000 }));
      process.stderr.write(`[bench] client: an invented finished ${CLIENT_PARTICLES}-particle run played in Chromium\n`);
      report.client = await benchClient(signedIn.page, url, CLIENT_PARTICLES);
    } catch (err) {
      // What was measured is still printed; the exit code says a section failed.
      console.error('[bench] a stack section failed:', err);
      failed = true;
    } finally {
      await signedIn.close();
    }
  }
  process.stdout.write(json ? `${JSON.stringify(toJson(report), null, 2)}\n` : `${toTable(report)}\n`);
  return failed ? 1 : 0;
}

main().then(
  (code) => process.exit(code),
  (err) => {
    console.error('[bench] failed:', err);
    process.exit(1);
  },
);
