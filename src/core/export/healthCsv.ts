/** health.csv: one row per health check, `check,status,detail`. */
import type { HealthCheck } from '../health/types.ts';
import { csvText } from './csvFormat.ts';

export const HEALTH_CSV_HEADER = ['check', 'status', 'detail'] as const;

/** The checks as CSV in their given order; status is pass, warn or skip; details are quoted when needed. */
export function healthCsv(checks: readonly HealthCheck[]): string {
  return csvText(HEALTH_CSV_HEADER, checks.map((c) => [c.id, c.status, c.detail.replace(/\s*\n\s*/g, ' ')]));
}
