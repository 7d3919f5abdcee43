import { ALERT_LABELS, type AlertKind, type AlertSeverity, type Evidence } from '@wellkept/core';
import type { SiteDayFigures } from '../site-day-figures.repository.js';
import { formatEvidenceValue, formatSi, formatTime, type Reader } from './format.js';
import { renderHtml, renderText, type Block } from './html.js';
import { OWNER_WORDING } from './owner-wording.js';

/** One alert event as a message describes it (the same for every recipient). */
export interface AlertMailContext {
  event: 'opened' | 'reopened' | 'cleared';
  at: Date;
  /** Who cleared it, when a person did (null when the rules did). */
  clearedByName: string | null;
  note: string | null;
  alert: {
    id: string;
    kind: AlertKind;
    subject: string;
    /** The equipment's name when the subject is a piece of equipment. */
    subjectName: string | null;
    severity: AlertSeverity;
    summary: string;
    openedAt: Date;
    /** The evidence of the event (at clear: the recovery), else the alert's. */
    evidence: Evidence | null;
  };
  site: { id: string; name: string; companyName: string };
  /** The last 24 hours in numbers; only installer mail shows them. */
  figures: SiteDayFigures | null;
  publicUrl: string;
}

export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

export interface MailReader extends Reader {
  name: string;
  role: 'admin' | 'technician' | 'owner';
}

export function alertMail(ctx: AlertMailContext, reader: MailReader): RenderedMail {
  return reader.role === 'owner' ? ownerAlertMail(ctx, reader) : installerAlertMail(ctx, reader);
}

/** Plain words for the owner: what happened, what it means for the water, who knows. */
export function ownerAlertMail(ctx: AlertMailContext, reader: MailReader): RenderedMail {
  const words = OWNER_WORDING[ctx.alert.kind];
  const label = ALERT_LABELS[ctx.alert.kind];
  const cleared = ctx.event === 'cleared';
  const subject = cleared
    ? `${ctx.site.name}: resolved - ${label}`
    : `${ctx.site.name}: ${label}${ctx.event === 'reopened' ? ' (again)' : ''}`;
  const blocks: Block[] = [{ type: 'paragraph', text: `Hello ${reader.name},` }];
  if (cleared) {
    blocks.push({ type: 'paragraph', text: words.cleared });
    if (ctx.clearedByName) {
      blocks.push({ type: 'paragraph', text: `${ctx.clearedByName} marked it as dealt with.` });
    }
    blocks.push({
      type: 'paragraph',
      text: `${ctx.site.companyName}, who looks after your system, has been told as well.`,
    });
  } else {
    blocks.push(
      { type: 'heading', text: 'What happened' },
      {
        type: 'paragraph',
        text: `${words.opened}${ctx.event === 'reopened' ? ' This has happened again after it had cleared.' : ''} We noticed it at ${formatTime(ctx.at, reader)}.`,
      },
      { type: 'heading', text: 'What it means for your water' },
      { type: 'paragraph', text: words.meaning },
      { type: 'heading', text: 'Who knows' },
      {
        type: 'paragraph',
        text: `We have sent the details to ${ctx.site.companyName}, who installed and looks after your system. They may contact you.`,
      },
    );
    if (words.suggestion) {
      blocks.push(
        { type: 'heading', text: 'What you can do' },
        { type: 'paragraph', text: words.suggestion },
      );
    }
    if (words.caution) blocks.push({ type: 'caution', text: words.caution });
  }
  blocks.push(
    { type: 'link', text: 'See your water system', href: siteLink(ctx) },
    {
      type: 'paragraph',
      text: 'You receive this because your notification settings in Wellkept ask for it; you can change them there.',
    },
  );
  return { subject, text: renderText(blocks), html: renderHtml(subject, blocks) };
}

/** The evidence and the numbers for installers and technicians. */
export function installerAlertMail(ctx: AlertMailContext, reader: MailReader): RenderedMail {
  const label = ALERT_LABELS[ctx.alert.kind];
  const cleared = ctx.event === 'cleared';
  const what = ctx.alert.subjectName ?? ctx.alert.subject;
  const tag = cleared ? 'cleared' : ctx.alert.severity === 'act' ? 'act' : 'watch';
  const subject = `[${tag}] ${ctx.site.name}: ${label}${what ? ` (${what})` : ''}${ctx.event === 'reopened' ? ' reopened' : ''}`;
  const blocks: Block[] = [
    {
      type: 'heading',
      text: `${label} ${cleared ? 'cleared' : ctx.event === 'reopened' ? 'reopened' : 'opened'} at ${ctx.site.name}`,
    },
    { type: 'paragraph', text: ctx.alert.summary },
    {
      type: 'table',
      caption: 'Alert',
      rows: [
        ['Site', ctx.site.name],
        ['Kind', `${label} (${ctx.alert.kind})`],
        ...(what ? [['Equipment', what]] : []),
        ['Severity', ctx.alert.severity === 'act' ? 'act - needs a visit or action now' : 'watch'],
        ['Opened', formatTime(ctx.alert.openedAt, reader)],
        ...(cleared
          ? [
              [
                'Cleared',
                `${formatTime(ctx.at, reader)} by ${ctx.clearedByName ?? 'the rules (recovered)'}`,
              ],
            ]
          : ctx.event === 'reopened'
            ? [['Reopened', formatTime(ctx.at, reader)]]
            : []),
        ...(ctx.note ? [['Note', ctx.note]] : []),
      ],
    },
  ];
  const evidence = ctx.alert.evidence;
  if (evidence && (evidence.observed.length > 0 || evidence.thresholds.length > 0)) {
    blocks.push({
      type: 'paragraph',
      text: `Evidence: data from ${formatTime(evidence.fromT, reader)} to ${formatTime(evidence.toT, reader)}.`,
    });
    if (evidence.observed.length > 0) {
      blocks.push({
        type: 'table',
        caption: 'Observed',
        header: ['What', 'Value', 'When'],
        rows: evidence.observed.map((i) => [
          i.label,
          formatEvidenceValue(i, reader),
          i.t !== undefined ? formatTime(i.t, reader) : '',
        ]),
      });
    }
    if (evidence.thresholds.length > 0) {
      blocks.push({
        type: 'table',
        caption: 'Thresholds',
        rows: evidence.thresholds.map((i) => [i.label, formatEvidenceValue(i, reader)]),
      });
    }
  }
  if (ctx.figures) blocks.push(...figureBlocks(ctx.figures, reader));
  if (!cleared && OWNER_WORDING[ctx.alert.kind].caution) {
    blocks.push({
      type: 'paragraph',
      text: 'Owners linked to this site were told in plain words and asked to leave equipment to you.',
    });
  }
  blocks.push({ type: 'link', text: 'Open the site', href: siteLink(ctx) });
  return { subject, text: renderText(blocks), html: renderHtml(subject, blocks) };
}

/** Channels shown in "the last 24 hours", in order, with their labels. */
function channelLabel(name: string): string {
  if (name === 'battery/voltage') return 'Battery voltage';
  if (name === 'battery/current') return 'Battery current';
  if (name === 'battery/temperature') return 'Battery temperature';
  const m = /^(pv|pump|tank|pressure|well)\/?([^/]*)\/?(.*)$/.exec(name);
  if (!m) return name;
  const [, group, key, what] = m;
  if (group === 'tank') return `Tank ${key} level`;
  if (group === 'pv') return `PV ${key} ${what}`;
  if (group === 'pump') return `Pump ${key} ${what}`;
  if (group === 'pressure') return `Pressure ${key}`;
  return 'Well depth to water';
}

function figureBlocks(f: SiteDayFigures, reader: Reader): Block[] {
  const blocks: Block[] = [
    {
      type: 'heading',
      text: `The last 24 hours (${formatTime(f.from, reader)} to ${formatTime(f.to, reader)})`,
    },
  ];
  const channels = f.channels.filter(
    (c) => !c.name.endsWith('/running') && !c.name.endsWith('/closed'),
  );
  if (channels.length > 0) {
    blocks.push({
      type: 'table',
      caption: 'Readings',
      header: ['Channel', 'Lowest', 'Highest', 'Latest', 'Samples'],
      rows: channels.map((c) => [
        channelLabel(c.name),
        formatSi(c.min, c.unit, reader),
        formatSi(c.max, c.unit, reader),
        `${formatSi(c.last, c.unit, reader)} at ${formatTime(c.lastAt, reader)}`,
        String(c.samples),
      ]),
    });
  } else {
    blocks.push({ type: 'paragraph', text: 'No readings arrived in the last 24 hours.' });
  }
  if (f.pumps.length > 0) {
    blocks.push({
      type: 'table',
      caption: 'Pump runs',
      header: ['Pump', 'Runs', 'Run time', 'Water delivered', 'Mean current'],
      rows: f.pumps.map((p) => [
        p.name,
        String(p.runs),
        formatSi(p.runSeconds, 's', reader),
        p.waterCubicMetres === null ? '—' : formatSi(p.waterCubicMetres, 'm3', reader),
        p.meanCurrentAmps === null ? '—' : formatSi(p.meanCurrentAmps, 'A', reader),
      ]),
    });
  }
  blocks.push({
    type: 'paragraph',
    text: f.lastReadingAt
      ? `Last reading from the site: ${formatTime(f.lastReadingAt, reader)}.`
      : 'The site has never reported.',
  });
  return blocks;
}

function siteLink(ctx: AlertMailContext): string {
  return `${ctx.publicUrl}/sites/${ctx.site.id}`;
}
