import { describe, expect, it } from 'vitest'
import { api, signIn, TEST_DB, TRAVELLER2, useApp } from './app'

await useApp()

/** The `lang` attribute of the served document's <html> element. */
const htmlLang = (html: unknown) => /<html[^>]*\slang="([^"]*)"/.exec(String(html))?.[1]

describe(`languages (${TEST_DB})`, () => {
  it('PATCH /api/me refuses an unknown language, naming the field, and changes nothing', async () => {
    const cookie = await signIn(TRAVELLER2)
    const bad = await api('/api/me', { method: 'PATCH', cookie, body: { locale: 'xx' } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toEqual(['locale'])
    expect(bad.body.data.fields.locale).toMatch(/language/i)
    expect((await api('/api/me', { cookie })).body.locale).toBe('en')
  })

  it('PATCH /api/me {locale: de} is kept: GET /api/me shows it, and the next page is German', async () => {
    const cookie = await signIn(TRAVELLER2)
    const ok = await api('/api/me', { method: 'PATCH', cookie, body: { locale: 'de' } })
    expect(ok.status).toBe(200)
    expect(ok.body.locale).toBe('de')
    const me = await api('/api/me', { cookie })
    expect(me.body.locale).toBe('de')
    // The account's language wins over the browser's.
    const page = await api('/account', { cookie, headers: { 'accept-language': 'fr-FR,fr;q=0.9' } })
    expect(htmlLang(page.body)).toBe('de-DE')
    await api('/api/me', { method: 'PATCH', cookie, body: { locale: 'en' } })
  })

  it('sign-up keeps the language the page was shown in', async () => {
    const email = 'lengua@umbrafield.test'
    const r = await api('/api/auth/register', { method: 'POST', body: { name: 'Lucía Demo', email, password: 'a-long-password-1', locale: 'es' } })
    expect(r.status).toBe(202)
    const me = await api('/api/me', { cookie: await signIn(email, 'a-long-password-1') })
    expect(me.body.locale).toBe('es')
    const bad = await api('/api/auth/register', { method: 'POST', body: { name: 'Demo', email: 'other@umbrafield.test', password: 'a-long-password-1', locale: 'klingon' } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields)).toEqual(['locale'])
  })

  it.each([
    ['de', 'de-DE'],
    ['es-MX,es;q=0.9', 'es-ES'],
    ['fr-CA,fr;q=0.8,en;q=0.5', 'fr-FR'],
    ['ja-JP', 'en-GB'],
  ])('an anonymous visitor with Accept-Language %s gets <html lang="%s"> on a server-rendered page', async (accept, lang) => {
    const page = await api('/', { headers: { 'accept-language': accept } })
    expect(page.status).toBe(200)
    expect(htmlLang(page.body)).toBe(lang)
  })

  it('the language cookie (the header switcher) wins over Accept-Language, and the page text follows', async () => {
    const page = await api('/login', { headers: { 'accept-language': 'de', cookie: 'umbrafield_locale=fr' } })
    expect(htmlLang(page.body)).toBe('fr-FR')
    expect(String(page.body)).toContain('Se connecter')
    const de = await api('/login', { headers: { 'accept-language': 'de' } })
    expect(String(de.body)).toContain('Anmelden')
  })
})
