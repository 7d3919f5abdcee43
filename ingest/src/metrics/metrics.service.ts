import { Injectable } from '@nestjs/common';
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client';

/**
 * The service's Prometheus metrics, in a registry of its own (so several ingest apps in one
 * test process do not collide). Rates (records and packs per second) are `rate()` of the
 * counters on the Prometheus side.
 */
@Injectable()
export class MetricsService {
  readonly registry = new Registry();

  readonly packs = new Counter({
    name: 'wellkept_ingest_packs_total',
    help: 'SenML packs received, by outcome (committed, refused before storage, failed commit).',
    labelNames: ['outcome'] as const,
    registers: [this.registry],
  });

  readonly records = new Counter({
    name: 'wellkept_ingest_records_total',
    help: 'SenML records by outcome: stored, duplicate (already stored), rejected.',
    labelNames: ['outcome'] as const,
    registers: [this.registry],
  });

  readonly rejects = new Counter({
    name: 'wellkept_ingest_rejects_total',
    help: 'Rejected records (and whole packs) by kind of reason.',
    labelNames: ['reason'] as const,
    registers: [this.registry],
  });

  readonly batchRecords = new Histogram({
    name: 'wellkept_ingest_batch_records',
    help: 'Records per group commit.',
    buckets: [1, 8, 32, 128, 512, 2048, 8192, 32768],
    registers: [this.registry],
  });

  readonly batchPacks = new Histogram({
    name: 'wellkept_ingest_batch_packs',
    help: 'Packs per group commit.',
    buckets: [1, 4, 16, 64, 256, 1024, 4096],
    registers: [this.registry],
  });

  readonly commitSeconds = new Histogram({
    name: 'wellkept_ingest_commit_seconds',
    help: 'Time to commit one batch (transaction start to commit).',
    buckets: [0.002, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5],
    registers: [this.registry],
  });

  readonly ackSeconds = new Histogram({
    name: 'wellkept_ingest_ack_delay_seconds',
    help: 'Time from a pack reaching the broker to its acknowledgement being released.',
    buckets: [0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5],
    registers: [this.registry],
  });

  readonly queueRecords = new Gauge({
    name: 'wellkept_ingest_queue_records',
    help: 'Records waiting for a group commit.',
    registers: [this.registry],
  });

  readonly connectedGateways = new Gauge({
    name: 'wellkept_ingest_connected_gateways',
    help: 'Gateways connected to this node.',
    registers: [this.registry],
  });

  readonly refusedConnections = new Counter({
    name: 'wellkept_ingest_refused_connections_total',
    help: 'Connections refused or cut, by reason.',
    labelNames: ['reason'] as const,
    registers: [this.registry],
  });

  readonly throttled = new Counter({
    name: 'wellkept_ingest_throttled_total',
    help: 'Gateway connections refused and publishes held back by the per-gateway rate limits.',
    labelNames: ['kind'] as const,
    registers: [this.registry],
  });

  readonly rollupSeconds = new Histogram({
    name: 'wellkept_ingest_rollup_seconds',
    help: 'Time of one bucket and pump-run sweep.',
    buckets: [0.01, 0.05, 0.1, 0.5, 1, 5, 10, 30],
    registers: [this.registry],
  });

  constructor() {
    collectDefaultMetrics({ register: this.registry, prefix: 'wellkept_ingest_' });
  }
}
