/**
 * Names the planning page gives a site by itself: "Best ground 2 (25.687, 32.640)" from the
 * best-ground search, "Site 7" from a click on the map, "Site at 25.900, 32.700" from coordinates
 * typed without a name. A trip that uses such a site cannot be published until it has a real name.
 */
const AUTOMATIC_NAMES = [/^Best ground \d+\b/i, /^Site \d+$/i, /^Site at -?\d/i]

export function isAutomaticSiteName(name: string): boolean {
  const n = name.trim()
  return AUTOMATIC_NAMES.some((re) => re.test(n))
}
