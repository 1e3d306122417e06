import { z } from 'zod';

/** Every 4xx/5xx body: what went wrong, and where when a field is at fault. */
export const ErrorBody = z.object({
  error: z
    .object({
      code: z.string(),
      message: z.string(),
      field: z.string().optional(),
    })
    .catchall(z.unknown()),
});
export type ErrorBody = z.infer<typeof ErrorBody>;
