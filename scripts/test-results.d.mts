export function countVitest(report: unknown): { passed: number; failed: number; notRun: number; todo: number }
export function countPlaywright(report: unknown): { passed: number; failed: number; notRun: number }
