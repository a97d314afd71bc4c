export interface Summary {
  passed: number;
  failed: number;
  skipped: number;
  problems: string[];
  line: string;
  ok: boolean;
}
export function summarize(r: {
  vitest?: unknown;
  vitestStatus?: unknown;
  vitestRc?: number | null;
  playwright?: unknown;
  playwrightRc?: number | null;
  e2e?: boolean;
  buildFailed?: boolean;
  checks?: Record<string, unknown>;
  expectChecks?: string[];
  floor?: { vitest?: number; playwright?: number } | null;
}): Summary;
