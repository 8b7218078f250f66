// Numbers as the screens show them: fixed decimals per quantity (no float noise), units spelled
// out, and "±" uncertainties only when there is one.
import { formatDecimalDeg, formatSexagesimal, fromMetres } from '../../geodesy/index.ts';
import type { LengthUnitId } from '../../campaign/records.ts';

export const UNIT_LABEL: Record<LengthUnitId, string> = { m: 'm', km: 'km', ft: 'ft', 'us-ft': 'US survey ft', toise: 'toise' };

export function formatLatitude(deg: number, format: 'dms' | 'decimal'): string {
  return format === 'dms' ? formatSexagesimal(deg, { decimals: 2, hemisphere: 'NS' }) : `${formatDecimalDeg(deg, 7)}°`;
}

export function withUncertainty(value: number, sigma: number | null | undefined, decimals: number, unit = ''): string {
  const u = unit ? ` ${unit}` : '';
  return sigma === null || sigma === undefined || !Number.isFinite(sigma)
    ? `${value.toFixed(decimals)}${u}`
    : `${value.toFixed(decimals)} ± ${sigma.toFixed(decimals)}${u}`;
}

export function formatLength(metres: number, unit: LengthUnitId, decimals = 3): string {
  return `${fromMetres(metres, unit).toFixed(decimals)} ${UNIT_LABEL[unit]}`;
}

export function formatBytes(n: number | null): string {
  if (n === null) return 'unknown';
  if (n < 1024) return `${n} B`;
  if (n < 1024 ** 2) return `${(n / 1024).toFixed(1)} KiB`;
  if (n < 1024 ** 3) return `${(n / 1024 ** 2).toFixed(1)} MiB`;
  return `${(n / 1024 ** 3).toFixed(2)} GiB`;
}

/** "just now", "5 min ago", "3 h ago", "2 days ago" — for last activity and last sync. */
export function formatAge(thenMs: number | null, nowMs: number): string {
  if (thenMs === null) return 'never';
  const s = Math.max(0, (nowMs - thenMs) / 1000);
  if (s < 45) return 'just now';
  if (s < 3600) return `${Math.round(s / 60)} min ago`;
  if (s < 86400 * 2) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86400)} days ago`;
}

export function formatSigned(v: number, decimals: number): string {
  const t = v.toFixed(decimals);
  return v > 0 && !/^0\.?0*$/.test(t) ? `+${t}` : t === `-${(0).toFixed(decimals)}` ? (0).toFixed(decimals) : t;
}
