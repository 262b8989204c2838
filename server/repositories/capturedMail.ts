import { type Db, iso } from './db';

export interface CapturedMailRecord {
  id: number;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
}

export function capturedMailRepo(db: Db) {
  return {
    async insert(m: { from: string; to: string[]; subject: string; text: string; html: string | null; messageId: string | null }): Promise<number> {
      const [r] = await db('captured_mail')
        .insert({ envelope_from: m.from, recipients: JSON.stringify(m.to), subject: m.subject, text: m.text, html: m.html, message_id: m.messageId })
        .returning('id');
      return (r as { id: number }).id;
    },
    /** newest first */
    async list(limit: number): Promise<CapturedMailRecord[]> {
      const rows = await db('captured_mail').orderBy('id', 'desc').limit(limit);
      return rows.map((r: { id: number; received_at: Date; envelope_from: string; recipients: string[]; subject: string; text: string }) => ({
        id: r.id,
        receivedAt: iso(r.received_at),
        from: r.envelope_from,
        to: r.recipients,
        subject: r.subject,
        text: r.text,
      }));
    },
  };
}
