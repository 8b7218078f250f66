// The time field shows local wall time (what the crew's watch says); the record stores a UTC
// instant with Z (field-traps ). `datetime-local` inputs carry no offset, so the conversion
// uses the device's zone at that instant (Date's local-time constructor), and seconds are kept.
export function toLocalInput(ms: number): string {
  const d = new Date(ms);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}:${p(d.getSeconds())}`;
}

/** ISO 8601 UTC ("…Z") of a `datetime-local` value, or null when it is not a readable date-time. */
export function fromLocalInput(text: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(text.trim());
  if (!m) return null;
  const d = new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]), Number(m[4]), Number(m[5]), Number(m[6] ?? 0));
  return Number.isFinite(d.getTime()) ? d.toISOString() : null;
}
