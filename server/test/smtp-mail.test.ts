import { loadConfig } from '../src/config';
import { SmtpMailer } from '../src/notifications/domain/mailer';
import { startTestApp, type TestApp } from './helpers/app';
import { makeOrganisation, makePerson } from './helpers/factories';
import { anonymousClient, signedInClient } from './helpers/http';
import { freePort, startNode, type Started } from './helpers/processes';
import { tokenFromLink } from './helpers/recording-mailer';

// Real SMTP: a maildev catcher of our own on free ports, read back through its HTTP API.
let maildev: Started;
let inbox: string;
let t: TestApp;

interface CaughtMail {
  subject: string;
  html: string;
  text: string;
  from: { address: string; name: string }[];
  to: { address: string }[];
}

async function waitForMail(to: string, timeoutMs = 20_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const list = (await (await fetch(`${inbox}/api/email`)).json()) as CaughtMail[];
    const found = list.find((m) => m.to.some((r) => r.address === to));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail for ${to} arrived at maildev`);
}

beforeAll(async () => {
  const smtpPort = await freePort();
  const webPort = await freePort();
  inbox = `http://127.0.0.1:${webPort}`;
  maildev = await startNode(
    [
      'node_modules/maildev/dist/bin/maildev.js',
      '--smtp',
      String(smtpPort),
      '--web',
      String(webPort),
      '--ip',
      '127.0.0.1',
      '--web-ip',
      '127.0.0.1',
    ],
    {},
    /Press Ctrl\+C to stop/,
  );
  const env = { EVALON_SMTP_PORT: String(smtpPort) };
  t = await startTestApp(env, {
    mailer: new SmtpMailer(loadConfig({ ...process.env, ...env }).smtp),
  });
}, 30_000);
afterAll(async () => {
  await t?.close();
  await maildev?.stop();
});

it('sends the invitation through SMTP with HTML and text parts, and its link works', async () => {
  const org = await makeOrganisation(t.dataSource, 'lender');
  const fleet = await makePerson(t.dataSource, org.id, 'fleet_manager');
  const client = await signedInClient(t.app, fleet.email, fleet.password);
  const email = `smtp.invitee.${fleet.userId}@test.example`;
  await client.agent
    .post(`/api/organisations/${org.id}/invitations`)
    .set('X-XSRF-TOKEN', client.csrf)
    .send({ email, name: 'Smtp <Invitee>', role: 'coordinator' })
    .expect(201);

  const mail = await waitForMail(email);
  expect(mail.from).toEqual([{ address: 'no-reply@evalon.example', name: 'Evalon' }]);
  expect(mail.subject).toBe(`You are invited to join ${org.name} on Evalon`);
  expect(mail.text).toContain('logistics coordinator');
  expect(mail.html).toContain('Accept the invitation');
  // Names are escaped in HTML.
  expect(mail.html).toContain('Smtp &lt;Invitee&gt;');
  expect(mail.html).not.toContain('Smtp <Invitee>');
  const token = tokenFromLink(mail.text, '/accept-invitation');
  expect(mail.html).toContain(`${t.config.http.publicUrl}/accept-invitation?token=${token}`);

  const invitee = await anonymousClient(t.app);
  const accepted = await invitee.agent
    .post('/api/auth/accept-invitation')
    .set('X-XSRF-TOKEN', invitee.csrf)
    .send({ token, password: 'smtp-tested-password' })
    .expect(200);
  expect(accepted.body.user.email).toBe(email);
});
