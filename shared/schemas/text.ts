/**
 * Names shown to others (people, sites, trips) are one line of printable text. Control characters
 * (C0, DEL, C1: tabs, line breaks, escapes), Unicode line and paragraph separators and bidirectional
 * overrides are refused rather than stripped: they break CSV rows and e-mail headers, and can make a
 * name read differently from what it is. Ordinary spaces are fine.
 */
export const PLAIN_TEXT = /^[^\p{Cc}\p{Zl}\p{Zp}\u202A-\u202E\u2066-\u2069]*$/u

export const plainTextMessage = (field: string) => `${field.charAt(0).toUpperCase()}${field.slice(1)} may not contain control characters (tabs, line breaks and the like)`
