// The local fakes for hosted services, shared by `npm run demo` and the tests' global set-up.
// Each entry says how to start it and which app environment variables point the app at it.
export function fakeServices() {
  return []
}
