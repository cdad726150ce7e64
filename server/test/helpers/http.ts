import type { Express } from 'express';
import request, { type Response } from 'supertest';

/** supertest's cookie-keeping agent. */
type TestAgent = ReturnType<typeof request.agent>;

/** A cookie-keeping client plus the CSRF token it must echo on changing requests. */
export interface Client {
  agent: TestAgent;
  /** Current `XSRF-TOKEN` value. */
  csrf: string;
}

/** All Set-Cookie headers of a response. */
export function setCookies(res: Response): string[] {
  const raw = res.headers['set-cookie'] as unknown;
  if (!raw) return [];
  return Array.isArray(raw) ? (raw as string[]) : [String(raw)];
}

/** The Set-Cookie header for one cookie name, if the response set it. */
export function setCookie(res: Response, name: string): string | undefined {
  return setCookies(res).find((c) => c.startsWith(`${name}=`));
}

/** The value a response set for a cookie, if any. */
export function cookieValue(res: Response, name: string): string | undefined {
  const header = setCookie(res, name);
  return header ? decodeURIComponent(header.slice(name.length + 1).split(';')[0] ?? '') : undefined;
}

/** A new client with a session and CSRF token (as a browser has after loading the app). */
export async function anonymousClient(app: Express): Promise<Client> {
  const agent = request.agent(app);
  const res = await agent.get('/api/auth/csrf').expect(200);
  return { agent, csrf: (res.body as { csrfToken: string }).csrfToken };
}

/** Signs in with e-mail and password; fails the test if that does not work. */
export async function signedInClient(
  app: Express,
  email: string,
  password: string,
): Promise<Client> {
  const client = await anonymousClient(app);
  const res = await client.agent
    .post('/api/auth/login')
    .set('X-XSRF-TOKEN', client.csrf)
    .send({ email, password });
  if (res.status !== 200)
    throw new Error(`sign-in of ${email} answered ${res.status}: ${JSON.stringify(res.body)}`);
  client.csrf = cookieValue(res, 'XSRF-TOKEN') ?? client.csrf;
  return client;
}

/** The session id inside an `evalon.sid` cookie value (`s:<id>.<signature>`). */
export function sessionIdOf(cookieHeader: string | undefined): string | undefined {
  const value = cookieHeader
    ? decodeURIComponent(cookieHeader.split(';')[0]!.split('=').slice(1).join('='))
    : '';
  const match = /^s:([^.]+)\./.exec(value);
  return match?.[1];
}
