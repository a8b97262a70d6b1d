// Checkout Sessions: validation of the create parameters and the object Stripe returns.
// Only `mode=payment` with inline `price_data` is implemented; see README for the list.
import { ApiError, invalidParam, missingParam } from "./errors";
import { newId, unixNow } from "./ids";

export type SessionStatus = "open" | "complete" | "expired";
export type PaymentStatus = "unpaid" | "paid";

export interface LineItem {
  id: string;
  object: "item";
  amount_discount: number;
  amount_subtotal: number;
  amount_tax: number;
  amount_total: number;
  currency: string;
  description: string;
  price: {
    id: string;
    object: "price";
    active: boolean;
    currency: string;
    livemode: false;
    product: string;
    type: "one_time";
    unit_amount: number;
  };
  quantity: number;
}

export interface CheckoutSession {
  id: string;
  object: "checkout.session";
  amount_subtotal: number;
  amount_total: number;
  cancel_url: string | null;
  client_reference_id: string | null;
  created: number;
  currency: string;
  customer: null;
  customer_details: { email: string | null; name: string | null } | null;
  customer_email: string | null;
  expires_at: number;
  livemode: false;
  locale: string | null;
  metadata: Record<string, string>;
  mode: "payment";
  payment_intent: string | null;
  payment_method_types: string[];
  payment_status: PaymentStatus;
  status: SessionStatus;
  submit_type: string | null;
  success_url: string;
  total_details: { amount_discount: number; amount_shipping: number; amount_tax: number };
  url: string | null;
}

/** What the store keeps per session: the public object plus what only the fake needs. */
export interface StoredSession {
  session: CheckoutSession;
  lineItems: LineItem[];
  payUrl: string;
}

// Parameters we accept. Anything else is refused the way Stripe refuses unknown parameters,
// so that an app sending something the fake would silently ignore finds out in tests.
const KNOWN = new Set([
  "line_items",
  "mode",
  "success_url",
  "cancel_url",
  "client_reference_id",
  "customer_email",
  "metadata",
  "expires_at",
  "expand",
  "payment_method_types",
  "locale",
  "submit_type",
]);

const DAY = 24 * 60 * 60;

type Params = Record<string, unknown>;

export function buildSession(params: Params, payBaseUrl: string): StoredSession {
  for (const key of Object.keys(params)) {
    if (!KNOWN.has(key)) {
      throw invalidParam(key, `Received unknown parameter: ${key}`, "parameter_unknown");
    }
  }

  const mode = optionalString(params, "mode");
  if (mode === undefined) throw missingParam("mode");
  if (mode !== "payment") {
    throw invalidParam("mode", `Invalid mode: '${mode}'. This payment fake implements only 'payment'.`);
  }

  const successUrl = optionalString(params, "success_url");
  if (successUrl === undefined) throw missingParam("success_url");
  checkUrl("success_url", successUrl);
  const cancelUrl = optionalString(params, "cancel_url") ?? null;
  if (cancelUrl !== null) checkUrl("cancel_url", cancelUrl);

  const clientReferenceId = optionalString(params, "client_reference_id") ?? null;
  if (clientReferenceId !== null && clientReferenceId.length > 200) {
    throw invalidParam("client_reference_id", "client_reference_id must be at most 200 characters.");
  }

  const customerEmail = optionalString(params, "customer_email") ?? null;
  if (customerEmail !== null && !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(customerEmail)) {
    throw invalidParam("customer_email", `Invalid email address: ${customerEmail}`, "email_invalid");
  }

  const metadata = parseMetadata(params.metadata);
  const lineItems = parseLineItems(params.line_items);
  const currency = lineItems[0].currency;
  lineItems.forEach((item, i) => {
    if (item.currency !== currency) {
      throw invalidParam(
        `line_items[${i}][price_data][currency]`,
        "All line items must use the same currency.",
      );
    }
  });
  const amountTotal = lineItems.reduce((sum, item) => sum + item.amount_total, 0);
  if (amountTotal <= 0) {
    throw invalidParam("line_items", "The total of a payment-mode Checkout Session must be greater than zero.");
  }

  const created = unixNow();
  const expiresAt = parseExpiresAt(params.expires_at, created);
  const paymentMethodTypes = parsePaymentMethodTypes(params.payment_method_types);

  const id = newId("cs_test_", 58);
  const payUrl = `${payBaseUrl}/pay/${id}`;
  return {
    payUrl,
    lineItems,
    session: {
      id,
      object: "checkout.session",
      amount_subtotal: amountTotal,
      amount_total: amountTotal,
      cancel_url: cancelUrl,
      client_reference_id: clientReferenceId,
      created,
      currency,
      customer: null,
      customer_details: null,
      customer_email: customerEmail,
      expires_at: expiresAt,
      livemode: false,
      locale: optionalString(params, "locale") ?? null,
      metadata,
      mode: "payment",
      payment_intent: null,
      payment_method_types: paymentMethodTypes,
      payment_status: "unpaid",
      status: "open",
      submit_type: optionalString(params, "submit_type") ?? null,
      success_url: successUrl,
      total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 },
      url: payUrl,
    },
  };
}

function optionalString(params: Params, key: string): string | undefined {
  const value = params[key];
  if (value === undefined || value === "") return undefined;
  if (typeof value !== "string") throw invalidParam(key, `Invalid string: ${key} must be a string.`);
  return value;
}

function checkUrl(param: string, value: string): void {
  let parsed: URL;
  try {
    // `{CHECKOUT_SESSION_ID}` is a template Stripe fills in; the braces are not valid in a URL.
    parsed = new URL(value.replaceAll("{CHECKOUT_SESSION_ID}", "x"));
  } catch {
    throw invalidParam(param, `Not a valid URL`, "url_invalid");
  }
  if (parsed.protocol !== "http:" && parsed.protocol !== "https:") {
    throw invalidParam(param, `Not a valid URL`, "url_invalid");
  }
}

/** qs turns `a[0]`, `a[1]` into an array, but long or sparse lists into an object keyed by index. */
function asList(value: unknown): unknown[] | undefined {
  if (Array.isArray(value)) return value;
  if (value && typeof value === "object") {
    const entries = Object.entries(value);
    if (entries.every(([key]) => /^\d+$/.test(key))) {
      return entries.sort(([a], [b]) => Number(a) - Number(b)).map(([, v]) => v);
    }
  }
  return undefined;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value);
}

function parseMetadata(value: unknown): Record<string, string> {
  if (value === undefined || value === "") return {};
  if (!isRecord(value)) throw invalidParam("metadata", "Invalid object: metadata must be a hash.");
  const out: Record<string, string> = {};
  const entries = Object.entries(value);
  if (entries.length > 50) throw invalidParam("metadata", "Metadata can have at most 50 keys.");
  for (const [key, v] of entries) {
    if (key === "__proto__") continue;
    if (key.length > 40) {
      throw invalidParam(`metadata[${key}]`, "Metadata keys must be at most 40 characters long.");
    }
    if (typeof v !== "string") throw invalidParam(`metadata[${key}]`, "Metadata values must be strings.");
    if (v.length > 500) {
      throw invalidParam(`metadata[${key}]`, "Metadata values must be at most 500 characters long.");
    }
    if (v !== "") out[key] = v;
  }
  return out;
}

function parseInteger(value: unknown, param: string): number {
  const n = typeof value === "string" && /^-?\d+$/.test(value) ? Number(value) : NaN;
  if (!Number.isSafeInteger(n)) throw invalidParam(param, `Invalid integer: ${String(value)}`, "parameter_invalid_integer");
  return n;
}

function parseLineItems(value: unknown): LineItem[] {
  if (value === undefined || value === "") throw missingParam("line_items");
  const list = asList(value);
  if (!list || list.length === 0) throw invalidParam("line_items", "Invalid array: line_items must be a list.");
  if (list.length > 100) throw invalidParam("line_items", "A Checkout Session can have at most 100 line items.");
  return list.map((raw, i) => parseLineItem(raw, `line_items[${i}]`));
}

function parseLineItem(raw: unknown, at: string): LineItem {
  if (!isRecord(raw)) throw invalidParam(at, `Invalid object: ${at} must be a hash.`);
  if (raw.price !== undefined) {
    // No Prices API here: a stored price id cannot exist in the fake.
    throw new ApiError(400, "invalid_request_error", `No such price: '${String(raw.price)}'`, {
      code: "resource_missing",
      param: `${at}[price]`,
    });
  }
  const priceData = raw.price_data;
  if (!isRecord(priceData)) throw missingParam(`${at}[price_data]`);

  const currencyRaw = priceData.currency;
  if (currencyRaw === undefined || currencyRaw === "") throw missingParam(`${at}[price_data][currency]`);
  if (typeof currencyRaw !== "string" || !/^[a-zA-Z]{3}$/.test(currencyRaw)) {
    throw invalidParam(`${at}[price_data][currency]`, `Invalid currency: ${String(currencyRaw)}`);
  }
  const currency = currencyRaw.toLowerCase();

  if (priceData.unit_amount === undefined || priceData.unit_amount === "") {
    throw missingParam(`${at}[price_data][unit_amount]`);
  }
  const unitAmount = parseInteger(priceData.unit_amount, `${at}[price_data][unit_amount]`);
  if (unitAmount < 0) {
    throw invalidParam(`${at}[price_data][unit_amount]`, "This value must be greater than or equal to 0.");
  }

  const productData = priceData.product_data;
  if (!isRecord(productData)) throw missingParam(`${at}[price_data][product_data]`);
  const name = productData.name;
  if (name === undefined || name === "") throw missingParam(`${at}[price_data][product_data][name]`);
  if (typeof name !== "string") throw invalidParam(`${at}[price_data][product_data][name]`, "Invalid string.");

  if (raw.quantity === undefined || raw.quantity === "") throw missingParam(`${at}[quantity]`);
  const quantity = parseInteger(raw.quantity, `${at}[quantity]`);
  if (quantity < 1) throw invalidParam(`${at}[quantity]`, "This value must be greater than or equal to 1.");

  const total = unitAmount * quantity;
  return {
    id: newId("li_", 24),
    object: "item",
    amount_discount: 0,
    amount_subtotal: total,
    amount_tax: 0,
    amount_total: total,
    currency,
    description: name,
    price: {
      id: newId("price_", 24),
      object: "price",
      active: false,
      currency,
      livemode: false,
      product: newId("prod_", 14),
      type: "one_time",
      unit_amount: unitAmount,
    },
    quantity,
  };
}

function parseExpiresAt(value: unknown, created: number): number {
  if (value === undefined || value === "") return created + DAY;
  const at = parseInteger(value, "expires_at");
  if (at < created + 30 * 60 || at > created + DAY) {
    throw invalidParam("expires_at", "The `expires_at` timestamp must be between 30 minutes and 24 hours from Checkout Session creation.");
  }
  return at;
}

function parsePaymentMethodTypes(value: unknown): string[] {
  if (value === undefined || value === "") return ["card"];
  const list = asList(value);
  if (!list || list.some((v) => v !== "card")) {
    throw invalidParam("payment_method_types", "This payment fake accepts only the payment method type 'card'.");
  }
  return ["card"];
}
