// The hosted payment page a Checkout Session's `url` points to: `GET /pay/:sessionId` shows the
// amount and line items with a card form; `POST /pay/:sessionId` pays, then redirects (303) to
// the session's success_url, or shows the decline (402) with the session still open.
// Only test card numbers are accepted, and card numbers are never stored.
import express from 'express';
import { formatAmount } from './money.mjs';
import { TEST_CARDS, paySession } from './resources.mjs';

const TITLE = 'Evalon test payment (local stand-in)';
const SUCCESS_CARD = '4242 4242 4242 4242';
const DECLINE_CARD = '4000 0000 0000 0002';
const DECLINED_MESSAGE = 'Your card was declined. Try another card.';

const escapeHtml = (value) =>
  String(value ?? '').replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c],
  );

/** Luhn check (ISO/IEC 7812-1), to tell a mistyped number from a declined one. */
function luhnValid(digits) {
  let sum = 0;
  for (let i = 0; i < digits.length; i += 1) {
    let d = Number(digits[digits.length - 1 - i]);
    if (i % 2 === 1) {
      d *= 2;
      if (d > 9) d -= 9;
    }
    sum += d;
  }
  return sum % 10 === 0;
}

/** Validates the form; returns {card} or {errors: {field: message}}. `now` is fake time (ms). */
export function readCardForm(body, nowMs) {
  const errors = {};
  const number = String(body.cardNumber ?? '').replace(/[\s-]/g, '');
  let card;
  if (!number) errors.cardNumber = 'Enter a card number.';
  else if (!/^\d{12,19}$/.test(number) || !luhnValid(number)) {
    errors.cardNumber = 'This card number is not valid. Check it, or use a test card below.';
  } else if (!TEST_CARDS[number]) {
    errors.cardNumber = 'This page takes test card numbers only. Use one of the test cards below.';
  } else card = TEST_CARDS[number];
  const expiry = /^\s*(\d{1,2})\s*\/\s*(\d{2}|\d{4})\s*$/.exec(String(body.expiry ?? ''));
  let expMonth;
  let expYear;
  if (!expiry || Number(expiry[1]) < 1 || Number(expiry[1]) > 12) {
    errors.expiry = 'Enter the expiry date as MM / YY.';
  } else {
    expMonth = Number(expiry[1]);
    expYear = expiry[2].length === 2 ? 2000 + Number(expiry[2]) : Number(expiry[2]);
    const now = new Date(nowMs);
    const current = now.getUTCFullYear() * 12 + now.getUTCMonth() + 1;
    if (expYear * 12 + expMonth < current) errors.expiry = 'This card has expired.';
  }
  if (!/^\d{3,4}$/.test(String(body.cvc ?? '').trim())) {
    errors.cvc = 'Enter the 3 or 4 digit security code.';
  }
  if (Object.keys(errors).length) return { errors };
  return { card: { ...card, expMonth, expYear } };
}

function page({ title, body }) {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<title>${escapeHtml(title)}</title>
<style>
  :root { color-scheme: light; --ink: #1d2433; --muted: #4a5468; --line: #c9cfdb; --accent: #1f5fbf;
    --accent-ink: #ffffff; --error: #a4161a; --error-bg: #fdecec; --note-bg: #fff6da; }
  * { box-sizing: border-box; }
  body { margin: 0; font: 16px/1.5 system-ui, -apple-system, "Segoe UI", sans-serif; color: var(--ink);
    background: #f3f5f9; }
  main { max-width: 34rem; margin: 2rem auto; padding: 1.5rem; background: #fff; border-radius: 12px;
    box-shadow: 0 1px 3px rgb(0 0 0 / 12%); }
  h1 { font-size: 1.35rem; margin: 0 0 .25rem; }
  .note { background: var(--note-bg); border-left: 4px solid #b58100; padding: .5rem .75rem; margin: 1rem 0;
    font-size: .95rem; }
  .amount { font-size: 2rem; font-weight: 700; margin: .5rem 0 0; }
  .amount-label { color: var(--muted); margin: 0; }
  table { width: 100%; border-collapse: collapse; margin: 1rem 0; font-size: .95rem; }
  caption { text-align: left; font-weight: 600; margin-bottom: .25rem; }
  th, td { padding: .4rem .25rem; border-bottom: 1px solid var(--line); text-align: left; }
  td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
  fieldset { border: 1px solid var(--line); border-radius: 8px; padding: 1rem; margin: 1rem 0; }
  legend { font-weight: 600; padding: 0 .25rem; }
  label { display: block; font-weight: 600; margin-top: .75rem; }
  .hint { color: var(--muted); font-size: .9rem; margin: .1rem 0 .25rem; }
  input { width: 100%; font: inherit; padding: .55rem .65rem; border: 1px solid #7a8496; border-radius: 6px; }
  input[aria-invalid="true"] { border-color: var(--error); border-width: 2px; }
  .row { display: flex; gap: 1rem; } .row > div { flex: 1; }
  .field-error { color: var(--error); font-size: .9rem; margin: .25rem 0 0; }
  .alert { background: var(--error-bg); color: var(--error); border: 1px solid var(--error); border-radius: 6px;
    padding: .6rem .75rem; font-weight: 600; margin-bottom: 1rem; }
  .quick { display: flex; flex-wrap: wrap; gap: .5rem; margin-top: .75rem; }
  button { font: inherit; cursor: pointer; border-radius: 6px; padding: .55rem .9rem; }
  .secondary { background: #fff; color: var(--accent); border: 1px solid var(--accent); }
  .pay { width: 100%; margin-top: 1rem; background: var(--accent); color: var(--accent-ink); border: 0;
    font-weight: 700; font-size: 1.05rem; padding: .75rem; }
  a { color: var(--accent); }
  :focus-visible { outline: 3px solid #f0a400; outline-offset: 2px; }
  .back { display: inline-block; margin-top: 1rem; }
</style>
</head>
<body>
<main>
${body}
</main>
</body>
</html>`;
}

function notice() {
  return `<p class="note">This is a local stand-in for testing: no money moves. Never enter real card details.</p>`;
}

function summary(session) {
  const hold = session._intentData.captureMethod === 'manual';
  const rows = session._lineItems
    .map(
      (li) =>
        `<tr><td>${escapeHtml(li.description)}</td><td class="num">${li.quantity}</td>` +
        `<td class="num">${escapeHtml(formatAmount(li.price.unit_amount, li.currency))}</td>` +
        `<td class="num">${escapeHtml(formatAmount(li.amount_total, li.currency))}</td></tr>`,
    )
    .join('\n');
  return `<p class="amount-label">${hold ? 'Amount to hold on your card' : 'Amount to pay'}</p>
<p class="amount">${escapeHtml(formatAmount(session.amount_total, session.currency))}</p>
${hold ? '<p class="hint">This is a hold: the amount is reserved on the card and charged only if it is captured later.</p>' : ''}
<table>
<caption>What you are paying for</caption>
<thead><tr><th scope="col">Item</th><th scope="col" class="num">Qty</th><th scope="col" class="num">Unit price</th><th scope="col" class="num">Amount</th></tr></thead>
<tbody>
${rows}
</tbody>
<tfoot><tr><th scope="row" colspan="3">Total</th><td class="num">${escapeHtml(formatAmount(session.amount_total, session.currency))}</td></tr></tfoot>
</table>`;
}

function field({ id, label, hint, value, errors, autocomplete, inputmode, placeholder }) {
  const error = errors[id];
  const describedBy = [hint ? `${id}-hint` : '', error ? `${id}-error` : '']
    .filter(Boolean)
    .join(' ');
  return `<label for="${id}">${label}</label>
${hint ? `<p class="hint" id="${id}-hint">${hint}</p>` : ''}
<input id="${id}" name="${id}" value="${escapeHtml(value)}" autocomplete="${autocomplete}" inputmode="${inputmode}"
  ${placeholder ? `placeholder="${placeholder}"` : ''} required${describedBy ? ` aria-describedby="${describedBy}"` : ''}${error ? ' aria-invalid="true"' : ''}>
${error ? `<p class="field-error" id="${id}-error">${escapeHtml(error)}</p>` : ''}`;
}

function paymentForm(session, { values = {}, errors = {}, alert = null } = {}) {
  const errorList = Object.values(errors);
  const alertText =
    alert ?? (errorList.length ? 'Check the card details: ' + errorList.join(' ') : null);
  const body = `<h1>${TITLE}</h1>
${notice()}
${alertText ? `<div class="alert" role="alert" id="form-alert" tabindex="-1">${escapeHtml(alertText)}</div>` : ''}
${summary(session)}
<form method="post" action="/pay/${escapeHtml(session.id)}" novalidate>
<fieldset>
<legend>Card details</legend>
${field({ id: 'cardNumber', label: 'Card number', hint: 'Test cards only.', value: values.cardNumber ?? '', errors, autocomplete: 'cc-number', inputmode: 'numeric' })}
<div class="quick" role="group" aria-label="Fill in a test card">
  <button type="submit" class="secondary" formmethod="get" formnovalidate name="fill" value="success" data-card="${SUCCESS_CARD}">Test card that succeeds</button>
  <button type="submit" class="secondary" formmethod="get" formnovalidate name="fill" value="decline" data-card="${DECLINE_CARD}">Test card that is declined</button>
</div>
<div class="row">
<div>${field({ id: 'expiry', label: 'Expiry date', hint: 'MM / YY', value: values.expiry ?? '', errors, autocomplete: 'cc-exp', inputmode: 'numeric', placeholder: 'MM / YY' })}</div>
<div>${field({ id: 'cvc', label: 'Security code (CVC)', hint: '3 or 4 digits', value: values.cvc ?? '', errors, autocomplete: 'cc-csc', inputmode: 'numeric' })}</div>
</div>
</fieldset>
<button type="submit" class="pay">Pay ${escapeHtml(formatAmount(session.amount_total, session.currency))}</button>
</form>
${session.cancel_url ? `<a class="back" href="${escapeHtml(session.cancel_url)}">Cancel and go back</a>` : ''}
<script>
  // Quick fill in place (without a reload) when scripts run; without scripts the buttons reload
  // the page with the card filled in.
  for (const button of document.querySelectorAll('button[data-card]')) {
    button.addEventListener('click', (event) => {
      event.preventDefault();
      const form = button.form;
      form.cardNumber.value = button.dataset.card;
      if (!form.expiry.value) form.expiry.value = '12 / ' + String((new Date().getFullYear() + 3) % 100).padStart(2, '0');
      if (!form.cvc.value) form.cvc.value = '123';
      form.querySelector('.pay').focus();
    });
  }
  document.getElementById('form-alert')?.focus();
</script>`;
  return page({ title: TITLE, body });
}

function messagePage(heading, text, link) {
  return page({
    title: `${heading} – ${TITLE}`,
    body: `<h1>${escapeHtml(heading)}</h1>
${notice()}
<p>${escapeHtml(text)}</p>
${link ? `<a href="${escapeHtml(link.href)}">${escapeHtml(link.label)}</a>` : ''}`,
  });
}

const successTarget = (session) =>
  session.success_url?.replaceAll('{CHECKOUT_SESSION_ID}', session.id);

/**
 * Builds the /pay router.
 * @param {object} ctx the fake's context.
 */
export function createHostedPageRouter(ctx) {
  const router = express.Router();
  router.use(express.urlencoded({ extended: false, limit: '16kb' }));
  router.use((req, res, next) => {
    res.setHeader(
      'Content-Security-Policy',
      "default-src 'none'; style-src 'unsafe-inline'; script-src 'unsafe-inline'; base-uri 'none'; frame-ancestors 'none'",
    );
    res.setHeader('Cache-Control', 'no-store');
    res.type('html');
    if (ctx.sweep()) ctx.changed();
    next();
  });

  /** Answers for sessions that cannot be paid; returns true when it answered. */
  function notPayable(session, res) {
    if (!session) {
      res
        .status(404)
        .send(messagePage('Payment page not found', 'There is no payment with this link.'));
      return true;
    }
    if (session.status === 'expired') {
      res
        .status(410)
        .send(
          messagePage(
            'This payment page has expired',
            'The payment was not made. Go back and start again.',
            session.cancel_url ? { href: session.cancel_url, label: 'Go back' } : null,
          ),
        );
      return true;
    }
    if (session.status === 'complete') {
      const target = successTarget(session);
      if (target) res.redirect(303, target);
      else
        res.status(200).send(messagePage('Payment received', 'This payment is already complete.'));
      return true;
    }
    return false;
  }

  router.get('/:sessionId', (req, res) => {
    const session = ctx.state.checkoutSessions[req.params.sessionId];
    if (notPayable(session, res)) return;
    const values = {};
    // Without scripts the quick-fill buttons reload the page with ?fill=success|decline.
    if (req.query.fill === 'success' || req.query.fill === 'decline') {
      values.cardNumber = req.query.fill === 'success' ? SUCCESS_CARD : DECLINE_CARD;
      const year = (new Date(ctx.clock.nowMs()).getUTCFullYear() + 3) % 100;
      values.expiry = String(req.query.expiry || `12 / ${String(year).padStart(2, '0')}`);
      values.cvc = String(req.query.cvc || '123');
    }
    res.status(200).send(paymentForm(session, { values }));
  });

  router.post('/:sessionId', (req, res) => {
    const session = ctx.state.checkoutSessions[req.params.sessionId];
    if (notPayable(session, res)) return;
    const body = req.body ?? {};
    const values = { cardNumber: body.cardNumber, expiry: body.expiry, cvc: body.cvc };
    const form = readCardForm(body, ctx.clock.nowMs());
    if (form.errors) {
      res.status(400).send(paymentForm(session, { values, errors: form.errors }));
      return;
    }
    const outcome = paySession(ctx, session, form.card);
    ctx.changed();
    if (outcome.declined) {
      const alert =
        outcome.declineCode === 'insufficient_funds'
          ? 'Your card has insufficient funds. Try another card.'
          : DECLINED_MESSAGE;
      res.status(402).send(paymentForm(session, { values: { ...values, cvc: '' }, alert }));
      return;
    }
    const target = successTarget(session);
    if (target) res.redirect(303, target);
    else
      res.status(200).send(messagePage('Payment received', 'Thank you. You can close this page.'));
  });

  return router;
}
