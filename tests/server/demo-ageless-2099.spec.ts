import { describeAgelessDemo } from './demoAgeless'

// The latest round date tried: the catalogue (1900–2100) still holds a total eclipse (2099-09-14)
// and an annular one after 1 January 2099.
await describeAgelessDemo('2099-01-01')
