import { Inject, Injectable } from '@nestjs/common';
import { validateTelemetryPack } from '@wellkept/core';
import { INGEST_CONFIG, type IngestConfig } from '../config/ingest-config.js';
import { MetricsService } from '../metrics/metrics.service.js';
import type { BatchOutcome } from '../storage/telemetry-batch.repository.js';
import { GroupCommitWriter } from './group-commit-writer.js';
import type { PackToStore, RejectToStore } from './pack.js';
import { rejectCategory, storableText } from './reject-reasons.js';

/** Raw text kept with a reject, characters. */
const RAW_LIMIT = 500;

/** The gateway a connection authenticated as, and what validation needs to know of its site. */
export interface GatewaySession {
  gatewayId: string;
  siteId: string;
  batteryNominalVolts: number | null;
}

/** What the gateway is told on `gateways/<id>/rejects` (see docs/telemetry.md). */
export interface RejectsReport {
  receivedAt: string;
  messageId?: number;
  records: number;
  stored: number;
  rejected?: { index: number; name: string | null; reason: string }[];
  packError?: string;
}

export type IntakeCallback = (error: Error | null, report: RejectsReport | null) => void;

/**
 * From a PUBLISH payload to a queued pack: validates it with core's SenML validator (good
 * records of a partly bad pack are kept), normalises values for storage, and hands it to the
 * group-commit writer. The callback runs after the commit, with a report to publish when
 * something was refused.
 */
@Injectable()
export class PackIntakeService {
  constructor(
    private readonly writer: GroupCommitWriter,
    private readonly metrics: MetricsService,
    @Inject(INGEST_CONFIG) private readonly config: IngestConfig,
  ) {}

  receive(
    session: GatewaySession,
    payload: Buffer,
    messageId: number | undefined,
    done: IntakeCallback,
  ): void {
    const receivedAt = Date.now();
    const validation = validateTelemetryPack(payload, {
      nowSeconds: receivedAt / 1000,
      gatewayId: session.gatewayId,
      ...(session.batteryNominalVolts ? { batteryNominalVolts: session.batteryNominalVolts } : {}),
      limits: { maxPackBytes: this.config.maxPacketBytes },
    });
    const readings = validation.readings;
    const rejects: RejectToStore[] = [];
    let report: RejectsReport | null = null;
    if (validation.packError !== null) {
      this.metrics.rejects.inc({ reason: 'pack' });
      rejects.push({
        recordName: null,
        reason: storableText(validation.packError),
        raw: storableText(
          payload
            .subarray(0, RAW_LIMIT * 4)
            .toString('utf8')
            .slice(0, RAW_LIMIT),
        ),
      });
      report = {
        receivedAt: new Date(receivedAt).toISOString(),
        ...(messageId !== undefined ? { messageId } : {}),
        records: validation.recordCount,
        stored: 0,
        packError: validation.packError,
      };
    } else if (validation.rejected.length > 0) {
      const records = rawRecords(payload);
      for (const r of validation.rejected) {
        this.metrics.rejects.inc({ reason: rejectCategory(r.reason) });
        const raw = records?.[r.index];
        rejects.push({
          recordName: r.name === null ? null : storableText(r.name),
          reason: storableText(r.reason),
          raw: raw === undefined ? null : storableText(rawText(raw)),
        });
      }
      report = {
        receivedAt: new Date(receivedAt).toISOString(),
        ...(messageId !== undefined ? { messageId } : {}),
        records: validation.recordCount,
        stored: readings.length,
        rejected: validation.rejected.map((r) => ({
          index: r.index,
          name: r.name,
          reason: r.reason,
        })),
      };
    }
    const pack: PackToStore = {
      gatewayId: session.gatewayId,
      siteId: session.siteId,
      messageId,
      receivedAt,
      recordCount: validation.recordCount,
      readings,
      rejects,
    };
    this.writer.submit(pack, (error: Error | null, _outcome?: BatchOutcome) =>
      done(error, error ? null : report),
    );
  }
}

/**
 * A refused record as JSON text, cut to the stored length. JSON.stringify recurses, so a record
 * nested thousands of levels deep (which JSON.parse reads fine) would overflow the stack.
 */
function rawText(record: unknown): string {
  try {
    return JSON.stringify(record).slice(0, RAW_LIMIT);
  } catch {
    return '(record nested too deeply to show)';
  }
}

/** The pack's records as parsed JSON, to keep the raw text of refused ones (rare path). */
function rawRecords(payload: Buffer): unknown[] | null {
  try {
    const parsed: unknown = JSON.parse(payload.toString('utf8'));
    return Array.isArray(parsed) ? parsed : null;
  } catch {
    return null;
  }
}
