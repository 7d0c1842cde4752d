/** Text helpers for the sidebar's sentences. No DOM. */

/** "a; b; c; and 4 more" */
export function some<T>(items: readonly T[], show: (t: T) => string, max = 8): string {
  const shown = items.slice(0, max).map(show).join('; ');
  return items.length > max ? `${shown}; and ${items.length - max} more` : shown;
}
