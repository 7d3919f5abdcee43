import { Inject, Injectable } from '@nestjs/common';
import type { Logger } from 'pino';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { LOGGER } from '../logging/logger.js';
import { MetricsService } from '../metrics/metrics.service.js';
import { SiteUpdates } from '../site-updates/site-updates.js';
import {
  TelemetryBatchRepository,
  type BatchOutcome,
} from '../storage/telemetry-batch.repository.js';
import { LatestValuesService } from './latest-values.service.js';
import type { PackToStore } from './pack.js';

/** Called once the pack is committed (no error) or could not be (error: do not acknowledge). */
export type PackCallback = (error: Error | null, outcome?: BatchOutcome) => void;

interface Waiting {
  pack: PackToStore;
  records: number;
  done: PackCallback;
  enqueuedAt: number;
}

/** Refused because the queue is at its cap; the connection closes and the gateway re-sends. */
export class QueueFullError extends Error {
  constructor(limit: number) {
    super(`ingest queue full (${limit} records waiting for the database)`);
  }
}

/**
 * Group commit: packs wait (at most the batch window, or until the batch is full) and are
 * committed together in one transaction, then their callbacks run in arrival order. At most
 * INGEST_COMMIT_CONCURRENCY batches (default 2) are in flight; while they commit the next one
 * gathers, so batches grow with load
 * (the disk does ~2,750 fsyncs/s here: one commit per pack would cap throughput far below the
 * broker). A failed commit answers every pack of the batch with the error, so their connections
 * close without a PUBACK and the gateways re-send.
 */
@Injectable()
export class GroupCommitWriter {
  private readonly queue: Waiting[] = [];
  private queuedRecords = 0;
  private timer: NodeJS.Timeout | undefined;
  /** Batches whose transaction (or answering) has not finished. */
  private inFlight = 0;
  /** Resolves once every batch started so far has been answered (answers go out in order). */
  private answered: Promise<void> = Promise.resolve();

  constructor(
    private readonly repository: TelemetryBatchRepository,
    private readonly siteUpdates: SiteUpdates,
    private readonly latestValues: LatestValuesService,
    private readonly metrics: MetricsService,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  get depth(): { packs: number; records: number } {
    return { packs: this.queue.length, records: this.queuedRecords };
  }

  /** Queues a pack; `done` runs after its batch commits or fails. */
  submit(pack: PackToStore, done: PackCallback): void {
    // Rejects are rows too: a pack of only bad records still needs its commit.
    const records = Math.max(1, pack.readings.length + pack.rejects.length);
    if (this.queuedRecords + records > this.config.queueMaxRecords) {
      this.metrics.packs.inc({ outcome: 'queue_full' });
      done(new QueueFullError(this.config.queueMaxRecords));
      return;
    }
    this.queue.push({ pack, records, done, enqueuedAt: Date.now() });
    this.queuedRecords += records;
    this.metrics.queueRecords.set(this.queuedRecords);
    this.schedule();
  }

  /** Commits everything queued (graceful shutdown). */
  async flush(): Promise<void> {
    clearTimeout(this.timer);
    this.timer = undefined;
    while (this.inFlight > 0 || this.queue.length > 0) {
      if (this.queue.length > 0 && this.inFlight < this.config.commitConcurrency)
        this.startCommit();
      else await this.answered;
    }
  }

  private schedule(): void {
    // With a free slot: a full batch starts now, a partial one after the window (group
    // commit). A finishing batch starts the next one at once if packs are waiting.
    if (this.inFlight >= this.config.commitConcurrency) return;
    if (this.queuedRecords >= this.config.batchMaxRecords) {
      clearTimeout(this.timer);
      this.timer = undefined;
      this.startCommit();
      return;
    }
    if (!this.timer) {
      this.timer = setTimeout(() => {
        this.timer = undefined;
        if (this.inFlight < this.config.commitConcurrency) this.startCommit();
      }, this.config.batchWindowMs);
    }
  }

  private startCommit(): void {
    if (this.queue.length === 0) return;
    // Count first, then take the batch with one splice: shift() per pack moves the whole queue
    // each time (tens of thousands of entries at saturation) and showed up in profiles.
    let take = 0;
    let records = 0;
    while (take < this.queue.length) {
      const next = this.queue[take]!.records;
      if (take > 0 && records + next > this.config.batchMaxRecords) break;
      take += 1;
      records += next;
      if (records >= this.config.batchMaxRecords) break;
    }
    const batch = this.queue.splice(0, take);
    this.queuedRecords -= records;
    this.metrics.queueRecords.set(this.queuedRecords);
    this.inFlight += 1;
    // Transactions of up to `commitConcurrency` batches overlap (one fills while another
    // fsyncs), but each batch is answered only after every earlier batch has been answered.
    const outcome = this.store(batch);
    const previous = this.answered;
    this.answered = (async () => {
      const result = await outcome;
      await previous.catch(() => undefined);
      this.answerBatch(batch, result);
    })().finally(() => {
      this.inFlight -= 1;
      // Packs that arrived meanwhile have waited long enough: go again at once.
      if (this.queue.length > 0 && this.inFlight < this.config.commitConcurrency) {
        clearTimeout(this.timer);
        this.timer = undefined;
        this.startCommit();
      }
    });
  }

  /** Commits a batch; resolves to its outcome or to the error (never rejects). */
  private async store(batch: Waiting[]): Promise<BatchOutcome | Error> {
    const started = process.hrtime.bigint();
    try {
      const outcome = await this.repository.commit(batch.map((w) => w.pack));
      this.metrics.commitSeconds.observe(Number(process.hrtime.bigint() - started) / 1e9);
      return outcome;
    } catch (error) {
      return error instanceof Error ? error : new Error(String(error));
    }
  }

  private answerBatch(batch: Waiting[], outcome: BatchOutcome | Error): void {
    if (outcome instanceof Error) {
      const error = outcome;
      this.metrics.packs.inc({ outcome: 'commit_failed' }, batch.length);
      this.logger.error(
        { err: error, packs: batch.length },
        'batch commit failed; packs not acknowledged',
      );
      const failure = new Error(`database commit failed: ${error.message}`);
      for (const w of batch) this.answer(w, failure);
      return;
    }
    this.metrics.batchPacks.observe(batch.length);
    this.metrics.batchRecords.observe(batch.reduce((a, w) => a + w.records, 0));
    this.metrics.packs.inc({ outcome: 'committed' }, batch.length);
    this.metrics.records.inc({ outcome: 'stored' }, outcome.stored);
    this.metrics.records.inc({ outcome: 'duplicate' }, outcome.duplicates);
    this.metrics.records.inc({ outcome: 'rejected' }, outcome.rejected);
    for (const w of batch) this.answer(w, null, outcome);
    const { channelIds, times, values, texts } = outcome.rows;
    for (let i = 0; i < channelIds.length; i++) {
      this.latestValues.note(channelIds[i]!, times[i]!, values[i]!, texts[i]!);
    }
    try {
      this.siteUpdates.emit(outcome.updates);
    } catch (listenerError) {
      this.logger.error({ err: listenerError }, 'a site-update listener threw');
    }
  }

  private answer(w: Waiting, error: Error | null, outcome?: BatchOutcome): void {
    this.metrics.ackSeconds.observe((Date.now() - w.enqueuedAt) / 1000);
    try {
      w.done(error, outcome);
    } catch (callbackError) {
      this.logger.error({ err: callbackError }, 'pack callback threw');
    }
  }
}
