export interface FakeService {
  name: string
  label: string
  url: string
  args: string[]
  env: Record<string, string>
  health: string
  appEnv: Record<string, string>
}
export function fakeServices(o?: { appPort?: string | number }): FakeService[]
