// SWR keys shared by server pages (to prime the cache) and client hooks (to read it).
export const todayKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/today` : null);
