// How much one downloaded file holds. A wider choice is refused with words on narrowing it, never
// cut short without saying. A probe reporting each minute gives 1,440 readings a metric a day, so a
// file of readings holds about a month of three metrics from four probes (common practice, not a standard).
export const READINGS_EXPORT_CAP = 200_000;
export const LOGBOOK_EXPORT_CAP = 10_000;
