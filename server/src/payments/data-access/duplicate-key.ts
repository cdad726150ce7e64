/** Whether a query failed on a unique key (MariaDB error 1062). */
export function isDuplicateKey(error: unknown): boolean {
  const e = error as { errno?: number; driverError?: { errno?: number } } | null;
  return e?.errno === 1062 || e?.driverError?.errno === 1062;
}
