/**
 * Money in the console: amounts arrive in the currency's minor unit (cents, pence, fils…), as
 * the payment provider and our statements store them, and are shown in the currency's major
 * unit with Intl.NumberFormat. The number of minor digits is the one Intl (CLDR/ISO 4217)
 * gives for the currency, so JPY has none and BHD three; nothing here assumes "divide by 100".
 */

/** Digits after the decimal point for a currency (ISO 4217 minor unit, as Intl knows it). */
export function minorDigits(currency: string): number {
  return new Intl.NumberFormat('en', { style: 'currency', currency }).resolvedOptions()
    .maximumFractionDigits as number;
}

/** Minor units (integer) to the major-unit number: 12345 EUR cents → 123.45. */
export function minorToMajor(amountMinor: number, currency: string): number {
  const digits = minorDigits(currency);
  return amountMinor / 10 ** digits;
}

/**
 * Format an amount given in minor units for display, e.g. formatMinor(123456, 'EUR', 'de-DE')
 * → "1.234,56 €". The currency code is upper-cased (the provider sends "eur").
 */
export function formatMinor(amountMinor: number, currency: string, locale?: string): string {
  const code = currency.toUpperCase();
  return new Intl.NumberFormat(locale, { style: 'currency', currency: code }).format(
    minorToMajor(amountMinor, code),
  );
}
