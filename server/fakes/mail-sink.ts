import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import express from 'express';
import { config } from '../config';

// A local mail sink for development and tests: accepts any message over plain SMTP
// on 127.0.0.1, keeps the latest ones in memory and serves them as JSON.

export interface StoredMail {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

export interface MailSink {
  smtpPort: number;
  outboxUrl: string;
  messages(): StoredMail[];
  /** Resolves with the first message (already stored or arriving) that matches. */
  waitFor(match: (m: StoredMail) => boolean, timeoutMs?: number): Promise<StoredMail>;
  clear(): void;
  close(): Promise<void>;
}

const KEEP = 500;

const addresses = (a: AddressObject | AddressObject[] | undefined): string[] =>
  (Array.isArray(a) ? a : a ? [a] : []).flatMap((o) => o.value.map((v) => v.address ?? '')).filter(Boolean);

export async function startMailSink(opts: { smtpPort?: number; httpPort?: number } = {}): Promise<MailSink> {
  const store: StoredMail[] = [];
  const waiters = new Set<(m: StoredMail) => void>();
  let nextId = 1;

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    logger: false,
    size: 2 * 1024 * 1024,
    banner: 'Infall local mail sink',
    onData(stream, _session, callback) {
      simpleParser(stream).then(
        (parsed) => {
          const mail: StoredMail = {
            id: nextId++,
            receivedAt: new Date().toISOString(),
            from: addresses(parsed.from)[0] ?? '',
            to: addresses(parsed.to),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
          };
          store.push(mail);
          if (store.length > KEEP) store.shift();
          for (const w of waiters) w(mail);
          callback();
        },
        (err: Error) => callback(err),
      );
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(opts.smtpPort ?? config.mail.smtpPort, '127.0.0.1', () => resolve());
  });
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const app = express();
  app.disable('x-powered-by');
  app.get('/', (_req, res) => res.redirect(302, '/messages'));
  app.get('/messages', (_req, res) => res.json({ messages: [...store].reverse() }));
  app.get('/messages/:id', (req, res) => {
    const m = store.find((x) => String(x.id) === req.params.id);
    if (!m) return res.status(404).json({ error: 'no such message' });
    res.json(m);
  });
  app.get('/messages/:id/html', (req, res) => {
    const m = store.find((x) => String(x.id) === req.params.id);
    if (!m?.html) return res.status(404).type('text').send('no HTML part');
    // Shown as sent, but sandboxed: it must not run scripts against this origin.
    res.set('Content-Security-Policy', 'sandbox').type('html').send(m.html);
  });
  app.delete('/messages', (_req, res) => {
    store.length = 0;
    res.status(204).end();
  });
  const http: Server = await new Promise((resolve, reject) => {
    const s = app.listen(opts.httpPort ?? config.mail.outboxPort, '127.0.0.1');
    s.once('error', reject);
    s.once('listening', () => resolve(s));
  });
  const outboxUrl = `http://127.0.0.1:${(http.address() as AddressInfo).port}/messages`;

  return {
    smtpPort,
    outboxUrl,
    messages: () => [...store],
    waitFor(match, timeoutMs = 5000) {
      const found = store.find(match);
      if (found) return Promise.resolve(found);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => {
          waiters.delete(check);
          reject(new Error(`no matching mail within ${timeoutMs} ms`));
        }, timeoutMs);
        const check = (m: StoredMail) => {
          if (!match(m)) return;
          clearTimeout(timer);
          waiters.delete(check);
          resolve(m);
        };
        waiters.add(check);
      });
    },
    clear: () => {
      store.length = 0;
    },
    close: async () => {
      http.closeAllConnections();
      await Promise.all([new Promise<void>((r) => http.close(() => r())), new Promise<void>((r) => smtp.close(() => r()))]);
    },
  };
}
