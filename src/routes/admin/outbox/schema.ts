import { z } from 'zod';

/** The outbox list's URL: bad values fall back to "all", page 1, never an error page. */
export const outboxQuerySchema = z.object({
	state: z.enum(['pending', 'sent', 'failed', '']).catch(''),
	q: z.string().trim().max(100).catch(''),
	page: z.coerce.number().int().min(1).max(100_000).catch(1)
});
export type OutboxQueryParams = z.infer<typeof outboxQuerySchema>;

export const resendSchema = z.object({ id: z.coerce.number().int().positive() });
