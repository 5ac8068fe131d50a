/**
 * Minor units of a currency: how many decimals its amounts have (EUR 2, JPY 0, KWD 3). ISO 4217 lists
 * them; Intl.NumberFormat carries that table (ECMA-402 CurrencyDigits), so no copy is kept here.
 * An unknown code falls back to 2, as ECMA-402 does.
 */
export function minorUnitDigits(currency: string): number {
  try {
    return currencyFormat('en', currency).resolvedOptions().maximumFractionDigits ?? 2
  } catch {
    return 2
  }
}

/** Intl.NumberFormat for a locale and currency, made once (making one costs far more than using it). */
const formats = new Map<string, Intl.NumberFormat>()
function currencyFormat(locale: string, currency: string): Intl.NumberFormat {
  const key = `${locale}|${currency.toUpperCase()}`
  let f = formats.get(key)
  if (!f) {
    f = new Intl.NumberFormat(locale, { style: 'currency', currency: currency.toUpperCase() })
    if (formats.size > 200) formats.clear()
    formats.set(key, f)
  }
  return f
}

/**
 * An amount in integer minor units written in major units with exactly the currency's decimals and a
 * dot ("1234.50" EUR, "120000" JPY, "1.250" KWD), by integer arithmetic: no floating-point rounding.
 */
export function toMajorUnits(minor: number, currency: string): string {
  if (!Number.isSafeInteger(minor)) throw new Error(`not a whole number of minor units: ${minor}`)
  const digits = minorUnitDigits(currency)
  const sign = minor < 0 ? '-' : ''
  const abs = String(Math.abs(minor))
  if (digits === 0) return `${sign}${abs}`
  const padded = abs.padStart(digits + 1, '0')
  return `${sign}${padded.slice(0, -digits)}.${padded.slice(-digits)}`
}

/** An amount in minor units shown with its currency ("€1,234.50", "¥120,000"), with the currency's own decimals. */
export function formatMinor(minor: number, currency: string, locale = 'en-GB'): string {
  return currencyFormat(locale, currency).format(minor / 10 ** minorUnitDigits(currency))
}
