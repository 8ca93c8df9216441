// Brings the database up to date before the stack starts: migrations, then the demo seed.
import { openOrm, migrate } from '../db/orm';
import { seedDemo } from '../db/seed';

async function main() {
  const orm = await openOrm({ longStatements: true });
  try {
    const applied = await migrate(orm);
    if (applied.length) console.log(`[infall] applied migrations: ${applied.join(', ')}`);
    if (!process.argv.includes('--no-seed')) await seedDemo(orm);
  } finally {
    await orm.close();
  }
}

main().catch((err) => {
  console.error('[infall] preparing the database failed:', err);
  process.exit(1);
});
