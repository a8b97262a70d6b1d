// Money and charge vocabulary the browser needs too (no database here).
import type { ChargeKind, ChargeState } from "~/models/Charge";

export const chargeStateLabels: Record<ChargeState, string> = {
  raised: "raised",
  awaiting_payment: "awaiting payment",
  paid: "paid",
  waived: "waived",
};

export const chargeKindLabels: Record<ChargeKind, string> = {
  access_fee: "access fee",
  page_charge: "page charge",
};

/** Digits of the currency's minor unit (2 for EUR, 0 for JPY), as Intl knows them. */
export function minorDigits(currency: string): number {
  try {
    return new Intl.NumberFormat("en", { style: "currency", currency: currency.toUpperCase() }).resolvedOptions().maximumFractionDigits ?? 2;
  } catch {
    return 2;
  }
}

/** An amount in minor units as the currency shows it: `EUR 593.75`. */
export function formatMoney(amountMinor: number, currency: string): string {
  const digits = minorDigits(currency);
  const major = amountMinor / 10 ** digits;
  return `${currency.toUpperCase()} ${major.toLocaleString("en-GB", { minimumFractionDigits: digits, maximumFractionDigits: digits })}`;
}

/** The amount as a plain decimal for CSV (`593.75`, no grouping). */
export function decimalAmount(amountMinor: number, currency: string): string {
  const digits = minorDigits(currency);
  return (amountMinor / 10 ** digits).toFixed(digits);
}
