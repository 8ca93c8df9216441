// Printed by `npm start` once the stack answers: where to go and who to be.
import { config } from '../config';
import { DEMO_IDENTITIES } from '../fakes/identities';

const line = '-'.repeat(64);
console.log(`\n${line}\nInfall is running at ${config.publicUrl}\n`);
console.log('Sign in with the local provider as one of the invented demo people:');
for (const d of DEMO_IDENTITIES) console.log(`  ${d.role.padEnd(11)} ${d.name} (${d.login})`);
console.log(`\nOutbox of the local mail sink: http://${config.host}:${config.mail.outboxPort}/messages`);
console.log(`Results are numerical models, not observations. Ctrl-C stops everything.\n${line}\n`);
