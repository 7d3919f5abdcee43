import { ALERT_LABELS, type AlertKind } from '@wellkept/core';
import type { MailReader, RenderedMail } from './alert-mail.js';
import { formatTime } from './format.js';
import { renderHtml, renderText, type Block } from './html.js';
import { OWNER_WORDING } from './owner-wording.js';

/** One alert event held during a person's quiet hours. */
export interface HeldEvent {
  event: 'opened' | 'reopened' | 'cleared';
  at: Date;
  kind: AlertKind;
  summary: string;
  subjectName: string | null;
  siteId: string;
  siteName: string;
  companyName: string;
  /** The alert's state when the summary is written. */
  stillOpen: boolean;
}

/**
 * The morning summary: everything that opened or cleared during the quiet hours, oldest first,
 * and whether it is still open now. Owners read plain words; installers the rules' summaries.
 */
export function morningSummaryMail(
  held: readonly HeldEvent[],
  reader: MailReader,
  publicUrl: string,
): RenderedMail {
  const owner = reader.role === 'owner';
  const open = held.filter((h) => h.event !== 'cleared' && h.stillOpen).length;
  const subject = `Wellkept: ${held.length} alert ${held.length === 1 ? 'change' : 'changes'} during your quiet hours${open > 0 ? `, ${open} still open` : ''}`;
  const blocks: Block[] = [
    { type: 'paragraph', text: `Good morning ${reader.name},` },
    {
      type: 'paragraph',
      text: 'These alerts changed while your quiet hours were on. We held the e-mails until now.',
    },
  ];
  const bySite = new Map<string, HeldEvent[]>();
  for (const h of held) bySite.set(h.siteId, [...(bySite.get(h.siteId) ?? []), h]);
  for (const [siteId, events] of bySite) {
    const first = events[0]!;
    blocks.push({ type: 'heading', text: first.siteName });
    blocks.push({
      type: 'table',
      caption: 'What changed',
      header: ['When', 'Alert', 'What happened', 'Now'],
      rows: events.map((h) => [
        formatTime(h.at, reader),
        `${ALERT_LABELS[h.kind]}${h.subjectName ? ` (${h.subjectName})` : ''}`,
        describe(h, owner),
        h.stillOpen ? 'still open' : 'cleared',
      ]),
    });
    if (owner) {
      const cautions = [
        ...new Set(
          events
            .filter((h) => h.event !== 'cleared' && h.stillOpen)
            .map((h) => OWNER_WORDING[h.kind].caution)
            .filter((c): c is string => Boolean(c)),
        ),
      ];
      blocks.push({
        type: 'paragraph',
        text: `${first.companyName}, who looks after your system, has been sent the details.`,
      });
      for (const c of cautions) blocks.push({ type: 'caution', text: c });
    }
    blocks.push({
      type: 'link',
      text: owner ? 'See your water system' : 'Open the site',
      href: `${publicUrl}/sites/${siteId}`,
    });
  }
  return { subject, text: renderText(blocks), html: renderHtml(subject, blocks) };
}

function describe(h: HeldEvent, owner: boolean): string {
  const words = OWNER_WORDING[h.kind];
  if (h.event === 'cleared') return owner ? words.cleared : `Cleared: ${h.summary}`;
  const again = h.event === 'reopened' ? ' (again)' : '';
  return owner ? `${words.opened}${again}` : `${h.summary}${again}`;
}
