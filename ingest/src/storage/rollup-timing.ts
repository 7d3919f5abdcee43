/**
 * Timing of the bucket roll-up, shared by the writer (which marks late rows) and the sweep
 * (which rolls closed minutes up from raw rows).
 *
 * The sweep treats a minute as closed once it ended SWEEP_LAG_SECONDS ago (database clock). The
 * writer marks a row as late when its time is more than LATE_AFTER_SECONDS before the database
 * clock at the end of its transaction; late rows put their (site, minute) into rollup_pending
 * and the sweep recomputes those minutes. A row that is not marked late is at most
 * LATE_AFTER_SECONDS old when its transaction finishes, so it lands in a minute the sweep has
 * not closed yet as long as its commit takes less than the difference (10 s). On-time data
 * therefore costs the writer nothing extra; only late data is tracked.
 *
 * Staleness: a minute's bucket (and the hour and day buckets it feeds) appears between
 * SWEEP_LAG_SECONDS and SWEEP_LAG_SECONDS + the sweep interval (default 10 s) after the minute
 * ends, so charts are at most about 1 minute 40 seconds behind the newest raw reading.
 */
export const SWEEP_LAG_SECONDS = 30;
export const LATE_AFTER_SECONDS = 20;

/**
 * A switch sample changes the on-time and starts of the next sample's bucket too (each bucket
 * counts the interval that ends at its samples), so a late switch row also revisits the minutes
 * up to MAX_GAP after it.
 */
export const SWITCH_MAX_GAP_SECONDS = 600;
export const SWITCH_RESCAN_MINUTES = SWITCH_MAX_GAP_SECONDS / 60;
