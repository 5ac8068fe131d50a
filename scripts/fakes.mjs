// The local fakes for hosted services, shared by `npm run demo` and the tests' global set-up.
// Each entry says how to start it and which app environment variables point the app at it.
// With real services, set the app variables yourself and do not start the fakes.

/** @param {{ appPort?: string|number }} [o] */
export function fakeServices(o = {}) {
  const appPort = o.appPort ?? process.env.PORT ?? 3000
  const stripePort = process.env.STRIPE_FAKE_PORT || '12111'
  const webhookSecret = process.env.STRIPE_WEBHOOK_SECRET || 'whsec_umbrafield_local_fake'
  const smtpPort = process.env.MAIL_FAKE_SMTP_PORT || '1025'
  const webPort = process.env.MAIL_FAKE_WEB_PORT || '1080'
  const forecastPort = process.env.FORECAST_FAKE_PORT || '12121'
  const smsPort = process.env.SMS_FAKE_PORT || '12131'
  const smsSid = 'AC00000000000000000000000000000000'
  const smsToken = 'umbrafield_local_fake_token'
  return [
    {
      name: 'mail-catcher',
      label: 'Mail inbox',
      url: `http://127.0.0.1:${webPort}`,
      // maildev: SMTP and web inbox, bound to loopback only; REST listing at /api/email.
      args: ['node_modules/maildev/dist/bin/maildev.js', '--smtp', smtpPort, '--web', webPort, '--ip', '127.0.0.1', '--web-ip', '127.0.0.1', '--silent'],
      env: {},
      health: `http://127.0.0.1:${webPort}/api/email`,
      appEnv: {
        NUXT_MAIL_SMTP_HOST: '127.0.0.1',
        NUXT_MAIL_SMTP_PORT: smtpPort,
        NUXT_MAIL_SMTP_SECURE: 'false',
        NUXT_MAIL_FROM: 'Kestrel Sky Journeys (demo) <trips@umbrafield.test>',
      },
    },
    {
      name: 'stripe-fake',
      label: 'Stripe fake',
      url: `http://127.0.0.1:${stripePort}`,
      args: ['fakes/stripe/server.mjs'],
      env: { STRIPE_FAKE_PORT: stripePort, STRIPE_WEBHOOK_SECRET: webhookSecret, STRIPE_FAKE_WEBHOOK_URL: `http://127.0.0.1:${appPort}/api/stripe/webhook` },
      health: `http://127.0.0.1:${stripePort}/_fake/health`,
      appEnv: {
        NUXT_STRIPE_SECRET_KEY: 'sk_test_umbrafield_local_fake',
        NUXT_STRIPE_WEBHOOK_SECRET: webhookSecret,
        NUXT_STRIPE_API_HOST: '127.0.0.1',
        NUXT_STRIPE_API_PORT: stripePort,
        NUXT_STRIPE_API_PROTOCOL: 'http',
      },
    },
    {
      name: 'forecast-fake',
      label: 'Forecast fake',
      url: `http://127.0.0.1:${forecastPort}/_fake/forecast/state`,
      // Hourly cloud cover in Open-Meteo's FlatBuffers format, for the official SDK (fakes/forecast).
      args: ['fakes/forecast/server.mjs'],
      env: { FORECAST_FAKE_PORT: forecastPort },
      health: `http://127.0.0.1:${forecastPort}/_fake/health`,
      appEnv: { NUXT_FORECAST_API_URL: `http://127.0.0.1:${forecastPort}/v1/forecast` },
    },
    {
      name: 'sms-fake',
      label: 'SMS fake (sent texts at /_fake/messages)',
      url: `http://127.0.0.1:${smsPort}/_fake/messages`,
      args: ['fakes/sms/server.mjs'],
      env: { SMS_FAKE_PORT: smsPort, SMS_FAKE_ACCOUNT_SID: smsSid, SMS_FAKE_AUTH_TOKEN: smsToken },
      health: `http://127.0.0.1:${smsPort}/_fake/health`,
      appEnv: {
        NUXT_SMS_ACCOUNT_SID: smsSid,
        NUXT_SMS_AUTH_TOKEN: smsToken,
        NUXT_SMS_FROM: '+15005550006',
        NUXT_SMS_API_BASE: `http://127.0.0.1:${smsPort}`,
      },
    },
  ]
}
