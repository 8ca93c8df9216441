import nodemailer from 'nodemailer';
import { config } from '../config';

export interface Mail {
  to: string | string[];
  subject: string;
  text: string;
  html: string;
}

/** One message over SMTP (the local sink in development). A transport per message: mail is rare. */
export async function sendMail(mail: Mail): Promise<void> {
  const transport = nodemailer.createTransport({
    host: config.mail.smtpHost,
    port: config.mail.smtpPort,
    secure: false,
    // The local sink speaks plain SMTP; a real relay would set its own transport options.
    ignoreTLS: config.mail.smtpHost === '127.0.0.1',
  });
  try {
    await transport.sendMail({ from: config.mail.from, ...mail });
  } finally {
    transport.close();
  }
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

export interface Composed {
  subject: string;
  text: string;
  html: string;
}

/**
 * Builds both parts from the same paragraphs; a paragraph's link, if any, becomes an
 * anchor in HTML and a bare URL on its own line in text.
 */
export function compose(subject: string, paragraphs: Array<string | { text: string; href: string }>): Composed {
  const text = paragraphs.map((p) => (typeof p === 'string' ? p : `${p.text}\n${p.href}`)).join('\n\n') + '\n\n-- \nInfall\n';
  const body = paragraphs
    .map((p) =>
      typeof p === 'string'
        ? `<p style="margin:0 0 14px">${escapeHtml(p)}</p>`
        : `<p style="margin:0 0 14px"><a href="${escapeHtml(p.href)}" style="color:#1f6f5c;font-weight:600">${escapeHtml(p.text)}</a></p>`,
    )
    .join('\n');
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="margin:0;background:#f3f0e8;font-family:system-ui,sans-serif;color:#1d2329">
<div style="max-width:560px;margin:24px auto;background:#fffdf8;border-top:4px solid #1f6f5c;padding:24px 28px">
<h1 style="font-size:18px;margin:0 0 18px">${escapeHtml(subject)}</h1>
${body}
<p style="margin:24px 0 0;font-size:12px;color:#5d6670">Infall</p>
</div></body></html>`;
  return { subject, text, html };
}
