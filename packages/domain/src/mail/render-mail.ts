import type { Inline, ListItem, MailBlock, MailDraft, MailFooter, MailMessage } from './mail-message.js';

const HTML_ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text as HTML text or attribute value: `& < > " '` become entities. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]!);
}

const inlineText = (parts: Inline[]) => parts.map((p) => (typeof p === 'string' ? p : p.text ? `${p.text} (${p.href})` : p.href)).join('');
const inlineHtml = (parts: Inline[]) =>
  parts
    .map((p) => (typeof p === 'string' ? escapeHtml(p) : `<a href="${escapeHtml(p.href)}">${escapeHtml(p.text ?? p.href)}</a>`))
    .join('');
/** User-written text keeps its line breaks in both parts. */
const multiline = (text: string) => escapeHtml(text).replace(/\r?\n/g, '<br>');

function blockText(block: MailBlock): string {
  switch (block.type) {
    case 'paragraph':
      return inlineText(block.content);
    case 'quote':
      return `${block.label}: ${block.text.replace(/\r?\n/g, '\n  ')}`;
    case 'list': {
      const item = (i: ListItem) => [`- ${inlineText(i.content)}`, ...(i.details ?? []).map((d) => `  ${inlineText(d)}`)].join('\n');
      return [...(block.title ? [`${block.title}:`] : []), ...block.items.map(item)].join('\n');
    }
  }
}

function blockHtml(block: MailBlock): string {
  switch (block.type) {
    case 'paragraph':
      return `<p>${inlineHtml(block.content)}</p>`;
    case 'quote':
      return `<p><strong>${escapeHtml(block.label)}:</strong></p><blockquote style="margin:0 0 1em 0;padding-left:0.8em;border-left:3px solid #c9c9c9">${multiline(block.text)}</blockquote>`;
    case 'list': {
      const item = (i: ListItem) =>
        `<li>${inlineHtml(i.content)}${(i.details ?? []).map((d) => `<br><span style="color:#444">${inlineHtml(d)}</span>`).join('')}</li>`;
      return `${block.title ? `<h3 style="font-size:15px;margin:1.2em 0 0.4em">${escapeHtml(block.title)}</h3>` : ''}<ul style="padding-left:1.2em">${block.items.map(item).join('')}</ul>`;
    }
  }
}

const footerText = (f: MailFooter) => `${f.reason}${f.manage ? ` ${f.manage.text}: ${f.manage.href}` : ''}`;
const footerHtml = (f: MailFooter) =>
  `<p style="color:#666;font-size:12px">${escapeHtml(f.reason)}${f.manage ? ` <a href="${escapeHtml(f.manage.href)}">${escapeHtml(f.manage.text)}</a>.` : ''}</p>`;

/** Renders a draft to its plain-text and HTML parts. */
export function renderMail(draft: MailDraft): MailMessage {
  // "-- " on its own line: mail clients recognise what follows as the signature.
  const text = `${draft.blocks.map(blockText).join('\n\n')}\n\n-- \n${footerText(draft.footer)}\n`;
  const html = [
    '<!doctype html>',
    `<html><head><meta charset="utf-8"><title>${escapeHtml(draft.subject)}</title></head>`,
    '<body style="font-family:-apple-system,Segoe UI,Helvetica,Arial,sans-serif;font-size:14px;line-height:1.45;color:#1d1d1f">',
    ...draft.blocks.map(blockHtml),
    '<hr style="border:0;border-top:1px solid #ddd">',
    footerHtml(draft.footer),
    '</body></html>',
  ].join('\n');
  return { kind: draft.kind, subject: draft.subject, text, html, payload: draft.payload };
}
