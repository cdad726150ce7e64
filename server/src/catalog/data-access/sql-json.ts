/** mysql2 may return a JSON column as text or as parsed JSON. */
export function json<T>(value: unknown): T {
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}
