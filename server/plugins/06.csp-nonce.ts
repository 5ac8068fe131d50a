/**
 * Gives every script that Nuxt writes into a page (its config and payload in the head and at the end
 * of the body, the entry module) this response's CSP nonce, set by server/middleware/01.headers.ts.
 * The app's own rendered markup (htmlContext.body) is left alone: Vue escapes what it renders, and a
 * script that got in there some other way must not be blessed with the nonce.
 */
declare module 'h3' {
  interface H3EventContext { cspNonce?: string }
}

const withNonce = (chunk: string, nonce: string) => chunk.replace(/<script\b(?![^>]*\snonce=)/gi, `<script nonce="${nonce}"`)

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:html', (html, { event }) => {
    const nonce = event.context.cspNonce
    // Without a nonce in the header the inline scripts stay blocked: safe, and caught by the tests.
    if (!nonce) return
    html.head = html.head.map((c) => withNonce(c, nonce))
    html.bodyPrepend = html.bodyPrepend.map((c) => withNonce(c, nonce))
    html.bodyAppend = html.bodyAppend.map((c) => withNonce(c, nonce))
  })
})
