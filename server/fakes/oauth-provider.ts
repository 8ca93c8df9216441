import { createHash, randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import express, { type Request, type Response } from 'express';
import { config } from '../config';
import { escapeHtml } from '../services/mail';
import { DEMO_IDENTITIES, type DemoIdentity } from './identities';

// A small stand-in for a GitHub-style OAuth 2 provider, for development and tests:
// an authorize page to pick an invented identity, a token endpoint (with PKCE) and a
// user endpoint. State lives in memory; it never listens beyond 127.0.0.1.

export interface FakeProviderOptions {
  port?: number;
  clientId?: string;
  clientSecret?: string;
}

export interface FakeProvider {
  url: string;
  port: number;
  close(): Promise<void>;
}

interface Grant {
  login: string;
  redirectUri: string;
  challenge: string | null;
  expires: number;
}

const CODE_TTL_MS = 2 * 60_000;
const LOGIN_RE = /^[a-z0-9][a-z0-9-]{0,38}$/i;

/** Demo identities as listed; any other well-formed login gets an invented identity of its own. */
function identityFor(login: string): DemoIdentity {
  const demo = DEMO_IDENTITIES.find((d) => d.login === login);
  if (demo) return demo;
  const id = 900_000_000 + (parseInt(createHash('sha256').update(login).digest('hex').slice(0, 7), 16) % 99_999_999);
  return { id, login, name: login, email: `${login}@infall.example`, role: 'student' };
}

const ROLE_COLOUR: Record<DemoIdentity['role'], string> = { student: '#2f7d6b', instructor: '#b0652a', researcher: '#4a5ca8', admin: '#8d3557' };

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
body{margin:0;background:#efe9dd;color:#1c2228;font:16px/1.45 system-ui,sans-serif}
main{max-width:30rem;margin:2.5rem auto;padding:0 1rem}
h1{font-size:1.3rem;margin:0 0 .3rem}
p.note{margin:0 0 1.4rem;color:#4e5660;font-size:.92rem}
form{display:grid;gap:.6rem}
button{display:flex;justify-content:space-between;align-items:center;width:100%;padding:.8rem 1rem;border:1px solid #cfc6b4;border-left-width:.4rem;border-radius:.35rem;background:#fffcf5;font:inherit;cursor:pointer;text-align:left}
button:hover,button:focus-visible{background:#fff;outline:2px solid #1c2228;outline-offset:1px}
.role{font-size:.8rem;text-transform:uppercase;letter-spacing:.06em;color:#4e5660}
fieldset{border:1px dashed #b9ae98;border-radius:.35rem;padding:.8rem;margin-top:.8rem}
input[type=text]{width:100%;box-sizing:border-box;padding:.5rem;font:inherit;border:1px solid #b9ae98;border-radius:.25rem;margin:.3rem 0 .6rem}
.cancel{border-left-color:#7b7f86;justify-content:center}
</style></head><body><main>${body}</main></body></html>`;
}

function badRequest(res: Response, message: string): void {
  res.status(400).type('html').send(page('Sign-in request refused', `<h1>Sign-in request refused</h1><p>${escapeHtml(message)}</p>`));
}

export function createFakeProviderApp(opts: FakeProviderOptions = {}): express.Express {
  const clientId = opts.clientId ?? config.auth.clientId;
  const clientSecret = opts.clientSecret ?? config.auth.clientSecret;
  const grants = new Map<string, Grant>();
  const tokens = new Map<string, string>();
  const app = express();
  app.disable('x-powered-by');
  app.use(express.urlencoded({ extended: false, limit: '10kb' }));
  app.use(express.json({ limit: '10kb' }));

  // The authorize request's own parameters, checked on the page and on its form post.
  function authorizeParams(src: Record<string, unknown>, res: Response) {
    const get = (k: string) => (typeof src[k] === 'string' ? (src[k] as string) : '');
    const p = {
      client_id: get('client_id'),
      redirect_uri: get('redirect_uri'),
      state: get('state'),
      response_type: get('response_type'),
      code_challenge: get('code_challenge'),
      code_challenge_method: get('code_challenge_method'),
    };
    if (p.client_id !== clientId) return badRequest(res, 'Unknown client_id.');
    if (p.response_type !== 'code') return badRequest(res, 'response_type must be "code".');
    if (!/^https?:\/\/[^\s]+$/.test(p.redirect_uri)) return badRequest(res, 'redirect_uri must be an http(s) URL.');
    if (p.code_challenge && p.code_challenge_method !== 'S256') return badRequest(res, 'Only the S256 code challenge method is supported.');
    return p;
  }

  app.get('/authorize', (req: Request, res: Response) => {
    const p = authorizeParams(req.query as Record<string, unknown>, res);
    if (!p) return;
    const hidden = Object.entries(p)
      .map(([k, v]) => `<input type="hidden" name="${k}" value="${escapeHtml(v)}">`)
      .join('');
    const buttons = DEMO_IDENTITIES.map(
      (d) =>
        `<button type="submit" name="login" value="${escapeHtml(d.login)}" style="border-left-color:${ROLE_COLOUR[d.role]}" aria-label="Sign in as ${escapeHtml(d.name)}, invented ${d.role}"><span>${escapeHtml(d.name)}</span><span class="role">${d.role}</span></button>`,
    ).join('\n');
    res.type('html').send(
      page(
        'Infall local sign-in',
        `<h1>Infall local sign-in</h1>
<p class="note">A stand-in provider for development. Every identity here is invented.</p>
<form method="post" action="/authorize">${hidden}
${buttons}
<button type="submit" name="cancel" value="1" class="cancel" aria-label="Cancel and go back without signing in">Cancel</button>
</form>
<form method="post" action="/authorize">${hidden}
<fieldset><legend>Another invented login</legend>
<label for="other">Login (letters, digits, hyphens)</label>
<input id="other" type="text" name="login" required autocomplete="off" pattern="[A-Za-z0-9][A-Za-z0-9\\-]{0,38}">
<button type="submit" aria-label="Sign in with the login typed above"><span>Sign in with this login</span></button>
</fieldset>
</form>`,
      ),
    );
  });

  app.post('/authorize', (req: Request, res: Response) => {
    const body = (req.body ?? {}) as Record<string, unknown>;
    const p = authorizeParams(body, res);
    if (!p) return;
    const back = new URL(p.redirect_uri);
    back.searchParams.set('state', p.state);
    if (body.cancel) {
      back.searchParams.set('error', 'access_denied');
      back.searchParams.set('error_description', 'The sign-in was cancelled');
      return res.redirect(302, back.toString());
    }
    const login = String(body.login ?? '').trim();
    if (!LOGIN_RE.test(login)) return badRequest(res, 'Pick an identity or type a login of letters, digits and hyphens.');
    const code = randomBytes(24).toString('base64url');
    grants.set(code, { login, redirectUri: p.redirect_uri, challenge: p.code_challenge || null, expires: Date.now() + CODE_TTL_MS });
    back.searchParams.set('code', code);
    res.redirect(302, back.toString());
  });

  app.post('/token', (req: Request, res: Response) => {
    const body = (req.body ?? {}) as Record<string, string | undefined>;
    let [id, secret] = [body.client_id, body.client_secret];
    const basic = /^Basic (.+)$/i.exec(req.get('authorization') ?? '');
    if (basic) [id, secret] = Buffer.from(basic[1], 'base64').toString().split(':');
    const fail = (status: number, error: string, description: string) => res.status(status).json({ error, error_description: description });
    if (id !== clientId || secret !== clientSecret) return fail(401, 'invalid_client', 'Client authentication failed');
    if (body.grant_type !== 'authorization_code') return fail(400, 'unsupported_grant_type', 'Only authorization_code is supported');
    const grant = body.code ? grants.get(body.code) : undefined;
    if (body.code) grants.delete(body.code); // single use, even when the rest is wrong
    if (!grant || grant.expires < Date.now()) return fail(400, 'invalid_grant', 'The code is unknown, used or expired');
    if (grant.redirectUri !== body.redirect_uri) return fail(400, 'invalid_grant', 'redirect_uri differs from the authorize request');
    if (grant.challenge) {
      const verifier = body.code_verifier ?? '';
      if (createHash('sha256').update(verifier).digest('base64url') !== grant.challenge) return fail(400, 'invalid_grant', 'code_verifier does not match');
    }
    const accessToken = randomBytes(24).toString('base64url');
    tokens.set(accessToken, grant.login);
    res.json({ access_token: accessToken, token_type: 'bearer', scope: 'read:user user:email' });
  });

  app.get('/user', (req: Request, res: Response) => {
    const m = /^(?:Bearer|token) (.+)$/i.exec(req.get('authorization') ?? '');
    const login = m ? tokens.get(m[1]) : undefined;
    if (!login) return res.status(401).json({ message: 'Bad credentials' });
    const { id, name, email } = identityFor(login);
    res.json({ id, login, name, email });
  });

  return app;
}

export function startFakeProvider(opts: FakeProviderOptions = {}): Promise<FakeProvider> {
  const app = createFakeProviderApp(opts);
  return new Promise((resolve, reject) => {
    const server = app.listen(opts.port ?? config.auth.fakePort, '127.0.0.1');
    server.once('error', reject);
    server.once('listening', () => {
      const { port } = server.address() as AddressInfo;
      resolve({
        url: `http://127.0.0.1:${port}`,
        port,
        close: () =>
          new Promise<void>((done) => {
            server.close(() => done());
            server.closeAllConnections();
          }),
      });
    });
  });
}
