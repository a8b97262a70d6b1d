// Test cards the hosted page understands. Numbers follow Stripe's test-mode conventions
// so that people who know them need not learn new ones.

export type CardOutcome =
  | { ok: true }
  /** `declined`: the card was well-formed but refused; otherwise the input itself is wrong. */
  | { ok: false; declined: boolean; field: "number" | "expiry" | "cvc"; message: string };

export interface CardInput {
  number: string;
  expiry: string;
  cvc: string;
}

const DECLINES: Record<string, string> = {
  "4000000000000002": "Your card was declined.",
  "4000000000009995": "Your card has insufficient funds.",
  "4000000000000069": "Your card has expired.",
};

export const SUCCEEDING_CARD = "4242424242424242";

export function checkCard(input: CardInput, now = new Date()): CardOutcome {
  const number = input.number.replace(/[\s-]/g, "");
  if (!/^\d{12,19}$/.test(number)) return { ok: false, declined: false, field: "number", message: "Your card number is incomplete." };
  if (!passesLuhn(number)) return { ok: false, declined: false, field: "number", message: "Your card number is invalid." };

  const expiry = /^\s*(\d{1,2})\s*\/?\s*(\d{2}|\d{4})\s*$/.exec(input.expiry);
  if (!expiry) return { ok: false, declined: false, field: "expiry", message: "Your card's expiration date is incomplete." };
  const month = Number(expiry[1]);
  const year = expiry[2].length === 2 ? 2000 + Number(expiry[2]) : Number(expiry[2]);
  if (month < 1 || month > 12) return { ok: false, declined: false, field: "expiry", message: "Your card's expiration month is invalid." };
  const lastValidMonth = year * 12 + month;
  if (lastValidMonth < now.getUTCFullYear() * 12 + now.getUTCMonth() + 1) {
    return { ok: false, declined: false, field: "expiry", message: "Your card's expiration date is in the past." };
  }

  if (!/^\d{3,4}$/.test(input.cvc.trim())) {
    return { ok: false, declined: false, field: "cvc", message: "Your card's security code is incomplete." };
  }

  if (number === SUCCEEDING_CARD) return { ok: true };
  const decline = DECLINES[number];
  if (decline) return { ok: false, declined: true, field: "number", message: decline };
  return {
    ok: false,
    declined: true,
    field: "number",
    message: "Your card was declined. This is a test payment page: use a test card such as 4242 4242 4242 4242.",
  };
}

function passesLuhn(digits: string): boolean {
  let sum = 0;
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i]);
    if (i % 2 === 1) {
      d *= 2;
      if (d > 9) d -= 9;
    }
    sum += d;
  }
  return sum % 10 === 0;
}
