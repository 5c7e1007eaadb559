/** Answers of `/api/outbox` (the development mail outbox the owner reads). */
import { z } from 'zod';

export const outboxMessageSchema = z.object({
  id: z.string(),
  messageId: z.string().nullable(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string().nullable(),
  html: z.string().nullable(),
  attachments: z.array(z.object({ index: z.number(), filename: z.string(), contentType: z.string(), size: z.number() })),
  receivedAt: z.string(),
});
export const outboxListSchema = z.object({ messages: z.array(outboxMessageSchema) });
