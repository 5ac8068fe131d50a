export function freePort(): Promise<number>
export function freePortSync(): number
