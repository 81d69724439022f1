/**
 * What a composer returns: one message with a plain-text and an HTML part of the same content.
 * The outbox writer stores it once per recipient; the worker sends both parts.
 */
export interface MailMessage {
  /** Outbox kind (`build-failed`, `mask-approved`, …): what the mail is about, for queries and tests. */
  kind: string;
  subject: string;
  text: string;
  html: string;
  payload: Record<string, unknown>;
}

/** A run of a paragraph: plain text, or a link shown as its URL (or as `text`, with the URL after it in the plain part). */
export type Inline = string | { href: string; text?: string };

/** One bullet: its first line, and indented lines under it. */
export interface ListItem {
  content: Inline[];
  details?: Inline[][];
}

/**
 * The content of a mail as blocks, so every composer gets the same layout and no composer
 * writes markup itself: the renderer escapes every value once, in one place.
 */
export type MailBlock =
  | { type: 'paragraph'; content: Inline[] }
  | { type: 'list'; title?: string; items: ListItem[] }
  /** Text somebody wrote (a note, a reason, a comment): kept as written, line breaks included. */
  | { type: 'quote'; label: string; text: string };

/** Why the person gets the mail, and where to change that when they can. */
export interface MailFooter {
  reason: string;
  manage?: { text: string; href: string };
}

export interface MailDraft {
  kind: string;
  subject: string;
  blocks: MailBlock[];
  footer: MailFooter;
  payload: Record<string, unknown>;
}
