// One formatter each, created once: Intl constructors are slow enough to matter in tables.
const dateFormat = new Intl.DateTimeFormat(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
const countFormat = new Intl.NumberFormat(undefined);

export function formatDate(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateFormat.format(date);
}

export function formatCount(value: number): string {
  return countFormat.format(value);
}
