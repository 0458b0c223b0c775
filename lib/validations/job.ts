import { z } from 'zod';

/**
 * The body of POST /api/v1/estimates/{id}/cancel and /api/v1/studies/{id}/cancel:
 * empty, or a JSON object with nothing in it (unknown keys are refused).
 */
export const cancelRequestSchema = z.strictObject({});

export type CancelRequest = z.infer<typeof cancelRequestSchema>;
