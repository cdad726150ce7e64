// The provider's objects this fake implements and their state changes: PaymentIntents (with
// their charges), Refunds and Checkout Sessions in payment mode. No HTTP here: the routers call
// these with parsed parameters and a context {state, clock, emit, publicUrl}.
import { ApiError, invalidParam, invalidRequest, noSuch } from './errors.mjs';
import { MINIMUM_CHARGE, formatAmount } from './money.mjs';
import {
  applyMetadata,
  asList,
  readBoolean,
  readCurrency,
  readInteger,
  readString,
  readUrl,
} from './params.mjs';
import { newId, publicView } from './store.mjs';

/** Online card authorisations stay valid 7 days (docs/references.md, provider docs). */
export const HOLD_VALID_SECONDS = 7 * 24 * 60 * 60;
/** Checkout Sessions last 24 h unless `expires_at` says otherwise (30 min to 24 h; SDK docs). */
const SESSION_DEFAULT_SECONDS = 24 * 60 * 60;
const SESSION_MIN_SECONDS = 30 * 60;
/** Events are kept 30 days (the provider's documented retention, from memory). */
const EVENT_RETENTION_SECONDS = 30 * 24 * 60 * 60;

const CANCELABLE = [
  'requires_payment_method',
  'requires_capture',
  'requires_confirmation',
  'requires_action',
  'processing',
];

/**
 * Test payment methods the API accepts on confirm, named as the provider's test tokens are.
 * The hosted page maps card numbers onto the same outcomes.
 */
const TEST_PAYMENT_METHODS = {
  pm_card_visa: { brand: 'visa', last4: '4242' },
  pm_card_mastercard: { brand: 'mastercard', last4: '4444' },
  pm_card_visa_chargeDeclined: { brand: 'visa', last4: '0002', decline: 'generic_decline' },
  pm_card_chargeDeclined: { brand: 'visa', last4: '0002', decline: 'generic_decline' },
  pm_card_chargeDeclinedInsufficientFunds: {
    brand: 'visa',
    last4: '9995',
    decline: 'insufficient_funds',
  },
};

/** Test card numbers the hosted page accepts and what each does. */
export const TEST_CARDS = {
  4242424242424242: { brand: 'visa', last4: '4242' },
  5555555555554444: { brand: 'mastercard', last4: '4444' },
  4000000000000002: { brand: 'visa', last4: '0002', decline: 'generic_decline' },
  4000000000009995: { brand: 'visa', last4: '9995', decline: 'insufficient_funds' },
};

const DECLINE_MESSAGES = {
  generic_decline: 'Your card was declined.',
  insufficient_funds: 'Your card has insufficient funds.',
};

function checkMinimum(amount, currency, param) {
  const minimum = MINIMUM_CHARGE[currency];
  if (minimum !== undefined && amount < minimum) {
    throw invalidParam(
      `Amount must be at least ${formatAmount(minimum, currency)} ${currency}`,
      param,
      'amount_too_small',
    );
  }
}

/** Looks an object up by id across kinds (used by `expand`). */
function lookup(state, id) {
  if (typeof id !== 'string') return undefined;
  if (id.startsWith('pi_')) return state.paymentIntents[id];
  if (id.startsWith('ch_')) return state.charges[id];
  if (id.startsWith('re_')) return state.refunds[id];
  if (id.startsWith('cs_')) return state.checkoutSessions[id];
  return undefined;
}

/** The line items of a session as the provider lists them. */
export function lineItemList(session) {
  return {
    object: 'list',
    data: publicView(session._lineItems),
    has_more: false,
    url: `/v1/checkout/sessions/${session.id}/line_items`,
  };
}

/**
 * The public view of an object with `expand` applied: ids named in the list (dot paths for
 * nested ones, e.g. `payment_intent.latest_charge`) become the objects they point to.
 */
export function render(ctx, object, expand = []) {
  const view = publicView(object);
  for (const path of expand) expandPath(ctx, view, path.split('.'), path);
  return view;
}

function expandPath(ctx, view, [head, ...rest], full) {
  if (view.object === 'checkout.session' && head === 'line_items') {
    view.line_items = lineItemList(ctx.state.checkoutSessions[view.id]);
    return;
  }
  if (!(head in view)) {
    throw invalidParam(`This property cannot be expanded (${full}).`, 'expand');
  }
  const target = lookup(ctx.state, view[head]);
  if (target) view[head] = publicView(target);
  if (rest.length && view[head] && typeof view[head] === 'object') {
    expandPath(ctx, view[head], rest, full);
  }
}

// ---------------------------------------------------------------- PaymentIntents

/** Finds an intent or answers 404 in the provider's words. */
export function getIntent(ctx, id) {
  const pi = ctx.state.paymentIntents[id];
  if (!pi) throw noSuch('payment_intent', id);
  return pi;
}

function buildIntent(ctx, { amount, currency, captureMethod, metadata, description, methodTypes }) {
  const id = newId('pi_');
  return {
    id,
    object: 'payment_intent',
    amount,
    amount_capturable: 0,
    amount_received: 0,
    application: null,
    application_fee_amount: null,
    automatic_payment_methods: null,
    canceled_at: null,
    cancellation_reason: null,
    capture_method: captureMethod,
    client_secret: `${id}_secret_${newId('', 25)}`,
    confirmation_method: 'automatic',
    created: ctx.clock.now(),
    currency,
    customer: null,
    description,
    last_payment_error: null,
    latest_charge: null,
    livemode: false,
    metadata,
    next_action: null,
    on_behalf_of: null,
    payment_method: null,
    payment_method_types: methodTypes,
    processing: null,
    receipt_email: null,
    review: null,
    setup_future_usage: null,
    shipping: null,
    source: null,
    statement_descriptor: null,
    statement_descriptor_suffix: null,
    status: 'requires_payment_method',
    transfer_data: null,
    transfer_group: null,
  };
}

/** `POST /v1/payment_intents`. `customer` is accepted and ignored (this fake has no customers). */
export function createIntent(ctx, p, request) {
  const amount = readInteger(p, 'amount', { required: true, min: 1 });
  const currency = readCurrency(p, 'currency', { required: true });
  checkMinimum(amount, currency, 'amount');
  const captureMethod =
    readString(p, 'capture_method', { oneOf: ['automatic', 'automatic_async', 'manual'] }) ??
    'automatic';
  const confirm = readBoolean(p, 'confirm');
  const pi = buildIntent(ctx, {
    amount,
    currency,
    captureMethod,
    metadata: applyMetadata({}, p.metadata),
    description: readString(p, 'description') ?? null,
    methodTypes: p.payment_method_types ? asList(p.payment_method_types).map(String) : ['card'],
  });
  const paymentMethod = readString(p, 'payment_method');
  if (paymentMethod) resolveTestPaymentMethod(paymentMethod);
  ctx.state.paymentIntents[pi.id] = pi;
  ctx.emit('payment_intent.created', pi, request);
  if (paymentMethod) pi.payment_method = paymentMethod;
  if (paymentMethod && !confirm) pi.status = 'requires_confirmation';
  if (confirm) confirmIntent(ctx, pi, p, request);
  return pi;
}

function resolveTestPaymentMethod(id) {
  const card = TEST_PAYMENT_METHODS[id];
  if (!card) throw noSuch('PaymentMethod', id, 'payment_method');
  return card;
}

/** `POST /v1/payment_intents/:id/confirm` (also `confirm=true` on create), with a test token. */
export function confirmIntent(ctx, pi, p, request) {
  if (!['requires_payment_method', 'requires_confirmation'].includes(pi.status)) {
    throw unexpectedState(ctx, pi, 'confirmed', [
      'requires_payment_method',
      'requires_confirmation',
    ]);
  }
  const token = readString(p, 'payment_method') ?? pi.payment_method;
  if (!token) {
    throw invalidRequest(
      'You cannot confirm this PaymentIntent because it is missing a payment method. ' +
        'Pass a test payment method such as pm_card_visa.',
      { code: 'payment_intent_unexpected_state', param: 'payment_method' },
    );
  }
  const card = resolveTestPaymentMethod(token);
  const outcome = chargeCard(ctx, pi, { ...card, expMonth: 12, expYear: 2034 }, request);
  if (outcome.declined) {
    throw new ApiError(402, 'card_error', outcome.message, {
      code: 'card_declined',
      declineCode: outcome.declineCode,
      extra: {
        charge: pi.latest_charge,
        payment_intent: publicView(pi),
        payment_method: { id: pi.last_payment_error.payment_method.id, object: 'payment_method' },
      },
    });
  }
  return pi;
}

/**
 * Authorises (and, for automatic capture, captures) a card payment for an intent. A declined
 * card leaves a failed charge and `last_payment_error` and returns the intent to
 * `requires_payment_method`, as the provider does. Card numbers are never stored: only brand
 * and last four digits.
 */
export function chargeCard(ctx, pi, card, request) {
  const now = ctx.clock.now();
  const paymentMethodId = newId('pm_');
  const declineCode = card.decline ?? null;
  const charge = {
    id: newId('ch_'),
    object: 'charge',
    amount: pi.amount,
    amount_captured: 0,
    amount_refunded: 0,
    balance_transaction: null,
    captured: false,
    created: now,
    currency: pi.currency,
    description: pi.description,
    failure_code: declineCode ? 'card_declined' : null,
    failure_message: declineCode ? DECLINE_MESSAGES[declineCode] : null,
    livemode: false,
    metadata: { ...pi.metadata },
    outcome: {
      network_status: declineCode ? 'declined_by_network' : 'approved_by_network',
      reason: declineCode,
      risk_level: 'normal',
      seller_message: declineCode
        ? 'The bank did not return any further details.'
        : 'Payment complete.',
      type: declineCode ? 'issuer_declined' : 'authorized',
    },
    paid: !declineCode,
    payment_intent: pi.id,
    payment_method: paymentMethodId,
    payment_method_details: {
      type: 'card',
      card: {
        brand: card.brand,
        last4: card.last4,
        exp_month: card.expMonth,
        exp_year: card.expYear,
        funding: 'credit',
      },
    },
    refunded: false,
    status: declineCode ? 'failed' : 'succeeded',
  };
  ctx.state.charges[charge.id] = charge;
  pi.latest_charge = charge.id;
  if (declineCode) {
    pi.status = 'requires_payment_method';
    pi.payment_method = null;
    pi.last_payment_error = {
      type: 'card_error',
      code: 'card_declined',
      decline_code: declineCode,
      message: DECLINE_MESSAGES[declineCode],
      charge: charge.id,
      payment_method: { id: paymentMethodId, object: 'payment_method', type: 'card' },
    };
    ctx.emit('payment_intent.payment_failed', pi, request);
    return { declined: true, declineCode, message: DECLINE_MESSAGES[declineCode] };
  }
  pi.payment_method = paymentMethodId;
  pi.last_payment_error = null;
  if (pi.capture_method === 'manual') {
    pi.status = 'requires_capture';
    pi.amount_capturable = pi.amount;
    pi._authorizedAt = now;
    ctx.emit('payment_intent.amount_capturable_updated', pi, request);
  } else {
    charge.captured = true;
    charge.amount_captured = pi.amount;
    pi.status = 'succeeded';
    pi.amount_received = pi.amount;
    ctx.emit('payment_intent.succeeded', pi, request);
  }
  return { declined: false };
}

function unexpectedState(ctx, pi, verb, allowed) {
  return invalidRequest(
    `This PaymentIntent could not be ${verb} because it has a status of ${pi.status}. ` +
      `Only a PaymentIntent with one of the following statuses may be ${verb}: ${allowed.join(', ')}.`,
    { code: 'payment_intent_unexpected_state', extra: { payment_intent: publicView(pi) } },
  );
}

/** `POST /v1/payment_intents/:id` (metadata and description; amount while unconfirmed). */
export function updateIntent(ctx, pi, p) {
  const amount = readInteger(p, 'amount', { min: 1 });
  const currency = readCurrency(p, 'currency');
  const captureMethod = readString(p, 'capture_method', {
    oneOf: ['automatic', 'automatic_async', 'manual'],
  });
  if (amount !== undefined || currency !== undefined || captureMethod !== undefined) {
    const editable = ['requires_payment_method', 'requires_confirmation'];
    if (!editable.includes(pi.status)) throw unexpectedState(ctx, pi, 'updated', editable);
    checkMinimum(amount ?? pi.amount, currency ?? pi.currency, 'amount');
    if (amount !== undefined) pi.amount = amount;
    if (currency !== undefined) pi.currency = currency;
    if (captureMethod !== undefined) pi.capture_method = captureMethod;
  }
  pi.metadata = applyMetadata(pi.metadata, p.metadata);
  const description = p.description;
  if (description !== undefined) pi.description = description === '' ? null : String(description);
  return pi;
}

/**
 * `POST /v1/payment_intents/:id/capture`. A partial capture releases the rest of the hold; the
 * charge then shows the released part in `amount_refunded`, as the provider's charges do.
 */
export function captureIntent(ctx, pi, p, request) {
  if (pi.status !== 'requires_capture')
    throw unexpectedState(ctx, pi, 'captured', ['requires_capture']);
  const amount = readInteger(p, 'amount_to_capture', { min: 1 }) ?? pi.amount_capturable;
  if (amount > pi.amount_capturable) {
    throw invalidRequest(
      `The amount to capture (${formatAmount(amount, pi.currency)}) is greater than the amount ` +
        `capturable on this PaymentIntent (${formatAmount(pi.amount_capturable, pi.currency)}).`,
      { code: 'amount_too_large', param: 'amount_to_capture' },
    );
  }
  pi.metadata = applyMetadata(pi.metadata, p.metadata);
  const charge = ctx.state.charges[pi.latest_charge];
  charge.captured = true;
  charge.amount_captured = amount;
  charge.amount_refunded = charge.amount - amount;
  pi.amount_received = amount;
  pi.amount_capturable = 0;
  pi.status = 'succeeded';
  delete pi._authorizedAt;
  ctx.emit('payment_intent.succeeded', pi, request);
  return pi;
}

function releaseHold(ctx, pi) {
  const charge = ctx.state.charges[pi.latest_charge];
  if (pi.status === 'requires_capture' && charge) {
    charge.amount_refunded = charge.amount;
    charge.refunded = true;
  }
  pi.amount_capturable = 0;
  delete pi._authorizedAt;
}

/** `POST /v1/payment_intents/:id/cancel`. Cancelling an authorised intent releases the hold. */
export function cancelIntent(ctx, pi, p, request) {
  if (!CANCELABLE.includes(pi.status)) throw unexpectedState(ctx, pi, 'canceled', CANCELABLE);
  const session = pi._checkoutSession && ctx.state.checkoutSessions[pi._checkoutSession];
  if (session && session.status === 'open') {
    throw invalidRequest(
      'This PaymentIntent belongs to an open Checkout Session; expire the session instead.',
      { code: 'payment_intent_unexpected_state' },
    );
  }
  const reason =
    readString(p, 'cancellation_reason', {
      oneOf: ['duplicate', 'fraudulent', 'requested_by_customer', 'abandoned'],
    }) ?? null;
  releaseHold(ctx, pi);
  pi.status = 'canceled';
  pi.canceled_at = ctx.clock.now();
  pi.cancellation_reason = reason;
  ctx.emit('payment_intent.canceled', pi, request);
  return pi;
}

// ---------------------------------------------------------------- Refunds

/**
 * `POST /v1/refunds`. Never more than what was captured and not yet refunded; refunds succeed at
 * once. The charge keeps the running `amount_refunded`.
 */
export function createRefund(ctx, p, request) {
  const piId = readString(p, 'payment_intent');
  const chargeId = readString(p, 'charge');
  if (!piId && !chargeId) {
    throw invalidParam(
      'One of the following params should be provided for this request: payment_intent or charge.',
      'payment_intent',
      'parameter_missing',
    );
  }
  let pi;
  let charge;
  if (chargeId) {
    charge = ctx.state.charges[chargeId];
    if (!charge) throw noSuch('charge', chargeId, 'charge');
    pi = ctx.state.paymentIntents[charge.payment_intent];
    if (piId && piId !== pi.id) {
      throw invalidParam(`Charge ${chargeId} does not belong to PaymentIntent ${piId}.`, 'charge');
    }
  } else {
    pi = ctx.state.paymentIntents[piId];
    if (!pi) throw noSuch('payment_intent', piId, 'payment_intent');
    charge = ctx.state.charges[pi.latest_charge];
  }
  if (!charge || charge.status !== 'succeeded' || !charge.captured) {
    throw invalidRequest(
      pi.status === 'requires_capture'
        ? `PaymentIntent ${pi.id} has not been captured, so there is nothing to refund. ` +
            'Cancel it to release the hold instead.'
        : `PaymentIntent ${pi.id} does not have a successful charge to refund.`,
      { code: 'charge_not_refundable', param: chargeId ? 'charge' : 'payment_intent' },
    );
  }
  const remaining = charge.amount - charge.amount_refunded;
  if (remaining <= 0) {
    throw invalidRequest(`Charge ${charge.id} has already been refunded.`, {
      code: 'charge_already_refunded',
    });
  }
  const amount = readInteger(p, 'amount', { min: 1 }) ?? remaining;
  if (amount > remaining) {
    throw invalidRequest(
      `Refund amount (${formatAmount(amount, charge.currency)}) is greater than unrefunded ` +
        `amount on charge (${formatAmount(remaining, charge.currency)})`,
      { code: 'amount_too_large', param: 'amount' },
    );
  }
  const refund = {
    id: newId('re_'),
    object: 'refund',
    amount,
    balance_transaction: null,
    charge: charge.id,
    created: ctx.clock.now(),
    currency: charge.currency,
    metadata: applyMetadata({}, p.metadata),
    payment_intent: pi.id,
    payment_method: charge.payment_method,
    reason:
      readString(p, 'reason', { oneOf: ['duplicate', 'fraudulent', 'requested_by_customer'] }) ??
      null,
    receipt_number: null,
    source_transfer_reversal: null,
    status: 'succeeded',
    transfer_reversal: null,
  };
  ctx.state.refunds[refund.id] = refund;
  charge.amount_refunded += amount;
  charge.refunded = charge.amount_refunded === charge.amount;
  ctx.emit('refund.created', refund, request);
  ctx.emit('charge.refunded', charge, request);
  return refund;
}

// ---------------------------------------------------------------- Checkout Sessions

/** Finds a session or answers 404. */
export function getSession(ctx, id) {
  const session = ctx.state.checkoutSessions[id];
  if (!session) throw noSuch('checkout.session', id);
  return session;
}

function readLineItems(ctx, p) {
  const raw = asList(p.line_items);
  if (raw.length === 0) {
    throw invalidParam('Missing required param: line_items.', 'line_items', 'parameter_missing');
  }
  return raw.map((item, i) => {
    const at = `line_items[${i}]`;
    if (item?.price) {
      throw invalidParam(
        'The local payments stand-in does not keep Prices; pass price_data instead.',
        `${at}[price]`,
      );
    }
    const data = item?.price_data;
    if (!data || typeof data !== 'object') {
      throw invalidParam(
        `Missing required param: ${at}[price_data].`,
        `${at}[price_data]`,
        'parameter_missing',
      );
    }
    const currency = readCurrency(data, 'currency', {
      label: `${at}[price_data][currency]`,
      required: true,
    });
    const unitAmount = readInteger(data, 'unit_amount', {
      label: `${at}[price_data][unit_amount]`,
      required: true,
      min: 0,
    });
    const name = readString(data.product_data, 'name', {
      label: `${at}[price_data][product_data][name]`,
      required: true,
    });
    const quantity = readInteger(item, 'quantity', {
      label: `${at}[quantity]`,
      required: true,
      min: 1,
    });
    const total = unitAmount * quantity;
    return {
      id: newId('li_'),
      object: 'item',
      amount_discount: 0,
      amount_subtotal: total,
      amount_tax: 0,
      amount_total: total,
      currency,
      description: name,
      price: {
        id: newId('price_'),
        object: 'price',
        active: false,
        billing_scheme: 'per_unit',
        created: ctx.clock.now(),
        currency,
        livemode: false,
        product: newId('prod_'),
        type: 'one_time',
        unit_amount: unitAmount,
        unit_amount_decimal: String(unitAmount),
      },
      quantity,
    };
  });
}

/** `POST /v1/checkout/sessions` (mode=payment only). */
export function createSession(ctx, p) {
  const mode = readString(p, 'mode', { required: true });
  if (mode !== 'payment') {
    throw invalidParam('The local payments stand-in supports mode=payment only.', 'mode');
  }
  const lineItems = readLineItems(ctx, p);
  const currency = lineItems[0].currency;
  if (lineItems.some((li) => li.currency !== currency)) {
    throw invalidParam('All line items must use the same currency.', 'line_items');
  }
  const total = lineItems.reduce((sum, li) => sum + li.amount_total, 0);
  checkMinimum(total, currency, 'line_items');
  const created = ctx.clock.now();
  const expiresAt = readInteger(p, 'expires_at') ?? created + SESSION_DEFAULT_SECONDS;
  if (expiresAt < created + SESSION_MIN_SECONDS || expiresAt > created + SESSION_DEFAULT_SECONDS) {
    throw invalidParam(
      'The expires_at timestamp must be between 30 minutes and 24 hours from Checkout Session creation.',
      'expires_at',
    );
  }
  const intentData = p.payment_intent_data ?? {};
  const captureMethod =
    readString(intentData, 'capture_method', {
      label: 'payment_intent_data[capture_method]',
      oneOf: ['automatic', 'automatic_async', 'manual'],
    }) ?? 'automatic';
  const id = newId('cs_test_', 58);
  const session = {
    id,
    object: 'checkout.session',
    after_expiration: null,
    allow_promotion_codes: null,
    amount_subtotal: total,
    amount_total: total,
    billing_address_collection: null,
    cancel_url: readUrl(p, 'cancel_url') ?? null,
    client_reference_id: readString(p, 'client_reference_id', { maxLength: 200 }) ?? null,
    client_secret: null,
    created,
    currency,
    customer: null,
    customer_details: null,
    customer_email: readString(p, 'customer_email') ?? null,
    expires_at: expiresAt,
    invoice: null,
    livemode: false,
    locale: readString(p, 'locale') ?? null,
    metadata: applyMetadata({}, p.metadata),
    mode,
    payment_intent: null,
    payment_link: null,
    payment_method_types: ['card'],
    payment_status: 'unpaid',
    setup_intent: null,
    status: 'open',
    submit_type: readString(p, 'submit_type') ?? null,
    subscription: null,
    success_url: readUrl(p, 'success_url') ?? null,
    total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 },
    ui_mode: 'hosted_page',
    url: `${ctx.publicUrl()}/pay/${id}`,
    _lineItems: lineItems,
    _intentData: {
      captureMethod,
      metadata: applyMetadata({}, intentData.metadata, 'payment_intent_data[metadata]'),
      description: readString(intentData, 'description') ?? null,
    },
  };
  ctx.state.checkoutSessions[id] = session;
  return session;
}

function closeSession(ctx, session, status, request) {
  session.status = status;
  // The provider shows `url` only while the session is open (SDK type docs).
  session.url = null;
  const pi = session._paymentIntent && ctx.state.paymentIntents[session._paymentIntent];
  if (status === 'expired' && pi && pi.status === 'requires_payment_method') {
    pi.status = 'canceled';
    pi.canceled_at = ctx.clock.now();
    pi.cancellation_reason = 'abandoned';
    ctx.emit('payment_intent.canceled', pi, request);
  }
  if (status === 'expired') ctx.emit('checkout.session.expired', session, request);
}

/** `POST /v1/checkout/sessions/:id/expire`. */
export function expireSession(ctx, session, request) {
  if (session.status !== 'open') {
    throw invalidRequest(
      `Only Checkout Sessions with a status of open can be expired; this one is ${session.status}.`,
      { code: 'checkout_session_unexpected_state' },
    );
  }
  closeSession(ctx, session, 'expired', request);
  return session;
}

/**
 * Pays an open session with a card from the hosted page. The intent is made on the first
 * attempt and reused for later ones, so a decline and the later success share one intent.
 * With manual capture the session completes with `payment_status: 'unpaid'`: the provider
 * reports `paid` only once funds are captured (its docs: paid = funds available).
 */
export function paySession(ctx, session, card) {
  let pi = session._paymentIntent && ctx.state.paymentIntents[session._paymentIntent];
  if (!pi) {
    pi = buildIntent(ctx, {
      amount: session.amount_total,
      currency: session.currency,
      captureMethod: session._intentData.captureMethod,
      metadata: { ...session._intentData.metadata },
      description: session._intentData.description,
      methodTypes: ['card'],
    });
    pi._checkoutSession = session.id;
    ctx.state.paymentIntents[pi.id] = pi;
    session._paymentIntent = pi.id;
    ctx.emit('payment_intent.created', pi, null);
  }
  const outcome = chargeCard(ctx, pi, card, null);
  if (outcome.declined) return outcome;
  session.payment_intent = pi.id;
  session.payment_status = pi.status === 'succeeded' ? 'paid' : 'unpaid';
  session.customer_details = { email: session.customer_email, name: null, phone: null };
  closeSession(ctx, session, 'complete', null);
  ctx.emit('checkout.session.completed', session, null);
  return outcome;
}

// ---------------------------------------------------------------- Time passing

/**
 * Applies what the passing of (fake) time does: uncaptured holds older than 7 days become
 * `canceled` with reason `automatic`, open sessions past `expires_at` expire, idempotency keys
 * older than 24 h and events older than 30 days are forgotten. Returns whether anything changed.
 */
export function sweep(ctx) {
  const now = ctx.clock.now();
  let changed = false;
  for (const pi of Object.values(ctx.state.paymentIntents)) {
    if (pi.status === 'requires_capture' && now > pi._authorizedAt + HOLD_VALID_SECONDS) {
      const expiredAt = pi._authorizedAt + HOLD_VALID_SECONDS;
      releaseHold(ctx, pi);
      pi.status = 'canceled';
      pi.canceled_at = expiredAt;
      pi.cancellation_reason = 'automatic';
      ctx.emit('payment_intent.canceled', pi, null);
      changed = true;
    }
  }
  for (const session of Object.values(ctx.state.checkoutSessions)) {
    if (session.status === 'open' && now >= session.expires_at) {
      closeSession(ctx, session, 'expired', null);
      changed = true;
    }
  }
  for (const [key, record] of Object.entries(ctx.state.idempotency)) {
    if (now - record.created >= 24 * 60 * 60) {
      delete ctx.state.idempotency[key];
      changed = true;
    }
  }
  const keepAfter = now - EVENT_RETENTION_SECONDS;
  if (ctx.state.events.length && ctx.state.events[0].created < keepAfter) {
    const dropped = new Set(ctx.state.events.filter((e) => e.created < keepAfter).map((e) => e.id));
    ctx.state.events = ctx.state.events.filter((e) => !dropped.has(e.id));
    ctx.state.deliveries = ctx.state.deliveries.filter(
      (d) => !dropped.has(d.event) || d.status === 'pending',
    );
    changed = true;
  }
  return changed;
}
