// Local stand-in for "Continue with Google": an OAuth 2.0 / OpenID Connect provider on
// 127.0.0.1 built on oauth2-mock-server, with a small account chooser in front of /authorize.
//
//   node infra/fakes/oauth/server.mjs        (port from EVALON_OAUTH_PORT, default 8089)
//
// GET /authorize without `login_hint` shows the chooser; with `login_hint` (from the chooser,
// or straight from a test) it hands over to the mock, which redirects back with a code. The
// chosen e-mail ends up in the access token, the id token and /userinfo, always verified.
import { createHash } from 'node:crypto';
import http from 'node:http';
import { pathToFileURL } from 'node:url';
import { OAuth2Issuer, OAuth2Service } from 'oauth2-mock-server';

const port = Number(process.env.EVALON_OAUTH_PORT ?? 8089);
const host = process.env.EVALON_OAUTH_HOST ?? '127.0.0.1';

/** Demo accounts offered as one-click buttons (the invented demo scenario). */
const demoAccounts = [
  ['admin@evalon.example', 'Noor Lindqvist'],
  ['buyer@velmora.example', 'Dana Whitcombe'],
  ['clinician@velmora.example', 'Rafael Oyelaran'],
  ['buyer@orlenbach.example', 'Friederike Albrecht-Sommer'],
  ['fleet@quorvel.example', 'Marcus Tennant-Hale'],
  ['coordinator@quorvel.example', 'Priya Ramaswamy-Cole'],
  ['proctor@proctors.example', 'Helena Osterby'],
];
const knownNames = new Map(demoAccounts);

/** Codes handed out by /authorize, until their token exchange: code -> {email, name}. */
const identities = new Map();
const codeLifetimeMs = 10 * 60_000;

function escapeHtml(text) {
  return String(text)
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/** A display name: the demo person's, or one made from the address (`jo.bloggs@` -> Jo Bloggs). */
function nameFor(email) {
  if (knownNames.has(email)) return knownNames.get(email);
  const local = email.split('@')[0] ?? email;
  return local
    .split(/[._-]+/)
    .filter(Boolean)
    .map((part) => part[0].toUpperCase() + part.slice(1))
    .join(' ');
}

/** A stable numeric subject per address, shaped like the provider's numeric `sub`. */
function subjectFor(email) {
  const digest = createHash('sha256').update(email).digest();
  return (digest.readBigUInt64BE(0) % 10n ** 20n).toString().padStart(21, '1');
}

function identityClaims(email) {
  return { sub: subjectFor(email), email, email_verified: true, name: nameFor(email) };
}

/** The account chooser page; every original query parameter rides along in hidden fields. */
function chooserPage(query) {
  const hidden = [...query.entries()]
    .filter(([key]) => key !== 'login_hint')
    .map(
      ([key, value]) =>
        `<input type="hidden" name="${escapeHtml(key)}" value="${escapeHtml(value)}">`,
    )
    .join('');
  const buttons = demoAccounts
    .map(
      ([email, name]) =>
        `<form method="get" action="/authorize">${hidden}<input type="hidden" name="login_hint" value="${escapeHtml(email)}">` +
        `<button type="submit" class="account"><strong>${escapeHtml(name)}</strong><span>${escapeHtml(email)}</span></button></form>`,
    )
    .join('\n');
  const cancel = new URL('/authorize/cancel', 'http://placeholder');
  for (const [key, value] of query.entries()) cancel.searchParams.set(key, value);
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Evalon test sign-in (local stand-in for Google)</title>
<style>
  body { font-family: system-ui, sans-serif; background: #f4f4f1; color: #1f2a2e; margin: 0; }
  main { max-width: 420px; margin: 48px auto; background: #fff; padding: 32px; border-radius: 8px; box-shadow: 0 1px 4px #0002; }
  h1 { font-size: 20px; margin: 0 0 8px; }
  p { color: #5b6b70; font-size: 14px; line-height: 20px; }
  label { display: block; font-size: 14px; margin: 16px 0 4px; }
  input[type=email] { width: 100%; box-sizing: border-box; padding: 10px; font-size: 16px; border: 1px solid #9aa7ab; border-radius: 4px; }
  button { cursor: pointer; font-size: 15px; }
  .primary { margin-top: 12px; padding: 10px 20px; background: #0f5257; color: #fff; border: 0; border-radius: 4px; }
  .account { display: flex; flex-direction: column; align-items: flex-start; width: 100%; margin: 6px 0; padding: 10px 12px; background: #fff; border: 1px solid #c9d1d3; border-radius: 4px; text-align: left; }
  .account span { color: #5b6b70; font-size: 13px; }
  h2 { font-size: 15px; margin: 24px 0 4px; }
  a { color: #0f5257; }
</style>
</head>
<body>
<main>
  <h1>Evalon test sign-in</h1>
  <p>This is the local stand-in for Google sign-in. Choose who you are; nothing leaves this machine.</p>
  <form method="get" action="/authorize">
    ${hidden}
    <label for="login_hint">E-mail address</label>
    <input id="login_hint" name="login_hint" type="email" required autocomplete="email" placeholder="name@hospital.example">
    <button type="submit" class="primary">Continue</button>
  </form>
  <h2>Demo accounts</h2>
  ${buttons}
  <p><a href="${escapeHtml(cancel.pathname + cancel.search)}">Cancel and go back</a></p>
</main>
</body>
</html>`;
}

/** Reads the (unverified) payload of a JWT; the mock signed it, we only need the claims back. */
function jwtPayload(token) {
  try {
    const part = token.split('.')[1];
    return JSON.parse(Buffer.from(part, 'base64url').toString('utf8'));
  } catch {
    return null;
  }
}

/** Starts the stand-in; resolves with {url, close}. */
export async function startOAuthFake({ port: listenPort = port, host: listenHost = host } = {}) {
  const issuer = new OAuth2Issuer();
  await issuer.keys.generate('RS256');
  const service = new OAuth2Service(issuer);

  // /authorize handed out a code: remember whose it is.
  service.on('beforeAuthorizeRedirect', ({ url }, req) => {
    const code = url.searchParams.get('code');
    const hint =
      typeof req.query?.login_hint === 'string' ? req.query.login_hint.trim().toLowerCase() : '';
    if (code && hint) {
      identities.set(code, { email: hint, at: Date.now() });
      for (const [c, v] of identities) if (Date.now() - v.at > codeLifetimeMs) identities.delete(c);
    }
  });
  // Access token and id token of that code carry the person's claims.
  service.on('beforeTokenSigning', (token, req) => {
    const code = req.body?.code;
    const identity = typeof code === 'string' ? identities.get(code) : undefined;
    if (identity) Object.assign(token.payload, identityClaims(identity.email));
  });
  // The code is spent once the token response is out.
  service.on('beforeResponse', (_response, req) => {
    const code = req.body?.code;
    if (typeof code === 'string') identities.delete(code);
  });
  // /userinfo answers with the claims of the bearer token it is shown.
  service.on('beforeUserinfo', (response, req) => {
    // The token comes as a Bearer header or, as some OAuth clients send it, ?access_token=.
    const auth = req.headers.authorization ?? '';
    const fromQuery = typeof req.query?.access_token === 'string' ? req.query.access_token : '';
    const token = auth.startsWith('Bearer ') ? auth.slice(7) : fromQuery;
    const payload = token ? jwtPayload(token) : null;
    if (!payload?.email) {
      response.statusCode = 401;
      response.body = {
        error: 'invalid_token',
        error_description: 'No signed-in person for this token.',
      };
      return;
    }
    response.body = identityClaims(payload.email);
  });

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://placeholder');
    if (
      req.method === 'GET' &&
      url.pathname === '/authorize' &&
      !url.searchParams.get('login_hint')
    ) {
      const email = url.searchParams.get('email');
      if (email) {
        // Support `?email=` too, as a convenience for people typing URLs by hand.
        url.searchParams.delete('email');
        url.searchParams.set('login_hint', email);
        res.writeHead(302, { Location: url.pathname + url.search }).end();
        return;
      }
      res.writeHead(200, {
        'Content-Type': 'text/html; charset=utf-8',
        'Cache-Control': 'no-store',
      });
      res.end(chooserPage(url.searchParams));
      return;
    }
    if (req.method === 'GET' && url.pathname === '/authorize/cancel') {
      const redirect = url.searchParams.get('redirect_uri');
      if (!redirect || !URL.canParse(redirect)) {
        res.writeHead(400, { 'Content-Type': 'text/plain' }).end('redirect_uri is missing');
        return;
      }
      const back = new URL(redirect);
      back.searchParams.set('error', 'access_denied');
      const state = url.searchParams.get('state');
      if (state) back.searchParams.set('state', state);
      res.writeHead(302, { Location: back.href }).end();
      return;
    }
    service.requestHandler(req, res);
  });

  await new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(listenPort, listenHost, resolve);
  });
  const address = server.address();
  const url = `http://${listenHost}:${address.port}`;
  issuer.url = url;
  return {
    url,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

const isMain =
  process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (isMain) {
  startOAuthFake()
    .then(({ url, close }) => {
      process.stdout.write(`[evalon] OAuth sign-in stand-in listening on ${url}\n`);
      const stop = () => close().then(() => process.exit(0));
      process.on('SIGINT', stop);
      process.on('SIGTERM', stop);
    })
    .catch((error) => {
      if (error?.code === 'EADDRINUSE') {
        process.stderr.write(
          `[evalon] port ${port} on ${host} is in use; set EVALON_OAUTH_PORT to another port.\n`,
        );
      } else {
        process.stderr.write(`[evalon] OAuth stand-in failed: ${error?.stack ?? error}\n`);
      }
      process.exit(1);
    });
}
