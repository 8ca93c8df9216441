// `tsx server/fakes/main.ts`: the local sign-in provider and mail sink, for development and tests.
import { config } from '../config';
import { startFakeProvider } from './oauth-provider';
import { startMailSink } from './mail-sink';
import { runProcess } from '../process';

runProcess('fakes', async () => {
  const provider = await startFakeProvider({ port: config.auth.fakePort });
  const sink = await startMailSink({ smtpPort: config.mail.smtpPort, httpPort: config.mail.outboxPort });
  console.log(`[fakes] sign-in provider on ${provider.url}/authorize`);
  console.log(`[fakes] mail sink: SMTP on 127.0.0.1:${sink.smtpPort}, outbox at ${sink.outboxUrl}`);
  return () => Promise.allSettled([provider.close(), sink.close()]);
});
