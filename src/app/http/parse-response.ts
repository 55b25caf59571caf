import { firstValueFrom, type Observable } from 'rxjs';
import { z } from 'zod';

/** Thrown when a reply does not match its shared schema: the client and server disagree on the contract. */
export class ResponseShapeError extends Error {
  override readonly name = 'ResponseShapeError';
}

/**
 * Waits for one reply and checks it against the shared zod schema, so nothing unchecked reaches a
 * component. The error names the request and every field that did not match.
 */
export async function parsed<Schema extends z.ZodType>(
  description: string,
  reply: Observable<unknown>,
  schema: Schema,
): Promise<z.output<Schema>> {
  const body = await firstValueFrom(reply);
  const result = schema.safeParse(body);
  if (!result.success) {
    throw new ResponseShapeError(`The reply to ${description} did not have the expected shape:\n${z.prettifyError(result.error)}`);
  }
  return result.data;
}

/** For requests whose reply carries nothing to read (204 No Content). */
export async function completed(reply: Observable<unknown>): Promise<void> {
  await firstValueFrom(reply, { defaultValue: null });
}
