/** Dates as the reader's locale writes them, with the ISO value kept for <time dateTime>. */
const dateTime = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });

export function formatDateTime(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : dateTime.format(d);
}

/** A length in nm with a fixed number of decimals (positions are snapped to a/4 ≈ 0.136 nm, so 3 decimals show them exactly enough). */
export function formatNm(value: number, decimals = 3): string {
  return value.toFixed(decimals);
}
