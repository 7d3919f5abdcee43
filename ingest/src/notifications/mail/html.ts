/** Escapes text for HTML element content and attribute values. */
export function escapeHtml(text: string): string {
  return text
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/** A block of a message, written once and rendered to both the HTML and the plain-text part. */
export type Block =
  | { type: 'heading'; text: string }
  | { type: 'paragraph'; text: string }
  | { type: 'caution'; text: string }
  | { type: 'table'; caption: string; header?: string[]; rows: string[][] }
  | { type: 'link'; text: string; href: string };

/** Renders blocks as the plain-text part. */
export function renderText(blocks: readonly Block[]): string {
  const out: string[] = [];
  for (const b of blocks) {
    switch (b.type) {
      case 'heading':
        out.push(b.text, '-'.repeat(Math.min(b.text.length, 72)));
        break;
      case 'paragraph':
        out.push(b.text);
        break;
      case 'caution':
        out.push(`CAUTION: ${b.text}`);
        break;
      case 'table': {
        out.push(`${b.caption}:`);
        const rows = b.header ? [b.header, ...b.rows] : b.rows;
        const widths =
          rows[0]?.map((_, i) => Math.max(...rows.map((r) => (r[i] ?? '').length))) ?? [];
        for (const r of rows) {
          out.push(
            `  ${r.map((c, i) => (i < r.length - 1 ? c.padEnd(widths[i] ?? 0) : c)).join('   ')}`,
          );
        }
        break;
      }
      case 'link':
        out.push(`${b.text}: ${b.href}`);
        break;
    }
    out.push('');
  }
  return out.join('\n').trimEnd() + '\n';
}

/** Renders blocks as a small, self-contained HTML document (inline styles only, no images). */
export function renderHtml(title: string, blocks: readonly Block[]): string {
  const body = blocks
    .map((b) => {
      switch (b.type) {
        case 'heading':
          return `<h2 style="font-size:17px;margin:20px 0 8px">${escapeHtml(b.text)}</h2>`;
        case 'paragraph':
          return `<p style="margin:0 0 12px;line-height:1.5">${escapeHtml(b.text)}</p>`;
        case 'caution':
          return `<p style="margin:0 0 12px;padding:10px 12px;border-left:4px solid #444;background:#f4f4f4;line-height:1.5"><strong>Caution:</strong> ${escapeHtml(b.text)}</p>`;
        case 'table': {
          const head = b.header
            ? `<tr>${b.header.map((h) => `<th style="text-align:left;padding:4px 12px 4px 0;border-bottom:1px solid #ccc">${escapeHtml(h)}</th>`).join('')}</tr>`
            : '';
          const rows = b.rows
            .map(
              (r) =>
                `<tr>${r.map((c) => `<td style="padding:4px 12px 4px 0;vertical-align:top">${escapeHtml(c)}</td>`).join('')}</tr>`,
            )
            .join('');
          return `<table style="border-collapse:collapse;margin:0 0 14px;font-size:14px"><caption style="text-align:left;font-weight:bold;padding-bottom:4px">${escapeHtml(b.caption)}</caption>${head}${rows}</table>`;
        }
        case 'link':
          return `<p style="margin:0 0 12px"><a href="${escapeHtml(b.href)}">${escapeHtml(b.text)}</a></p>`;
      }
    })
    .join('\n');
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title></head>
<body style="font-family:system-ui,-apple-system,'Segoe UI',sans-serif;color:#1a1a1a;max-width:640px;margin:0 auto;padding:16px">
${body}
</body></html>
`;
}
