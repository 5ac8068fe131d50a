import { describeAgelessDemo } from './demoAgeless'

// The demo after the hand-made 2027 scenario: invented trips for the next total and annular eclipses.
await describeAgelessDemo('2030-01-01')
