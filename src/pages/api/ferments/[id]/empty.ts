import { z } from 'zod';
import { route, json, idParam, invalidResponse, HttpError } from '../../../../server/http';
import { EMPTY_ERROR_CODES, emptyBackPath, emptyFerment, emptyInputSchema, fermentJson, type EmptyErrorCode } from '../../../../server/ferments';

const isFormPost = (request: Request) => /application\/x-www-form-urlencoded|multipart\/form-data/.test(request.headers.get('content-type') ?? '');

/** What only a plain form post carries: the page to go back to and the ticked confirmation. */
const FormExtras = z.object({ back: z.string().max(300).optional(), confirm: z.string().max(10).optional() });

/**
 * Mark the fermenter emptied: the wash went to the still (distilled, optionally naming the
 * stripping run that took the last of it) or was dumped (with a note saying why). Frees the
 * fermenter and stops the ferment's forecast.
 *
 * JSON (islands, tests) answers JSON. A plain form post (the ferment page and the "Is FV3 empty?"
 * question work without JavaScript) answers 303 back to the page it came from, with a message
 * code (?emptied=<id> or ?emptyError=<code>&ferment=<id>); a form post must carry confirm=yes.
 * Only POST is exported: a GET is answered 405 by Astro and changes nothing.
 */
export const POST = route({ auth: 'ferments.empty', body: z.unknown() }, async ({ req, ctx, body, params }) => {
  const id = idParam(params.id);
  const form = isFormPost(req.request);
  const parsed = emptyInputSchema.safeParse(body);
  if (!form) {
    if (!parsed.success) return invalidResponse(parsed.error);
    const ferment = await emptyFerment(ctx, id, parsed.data);
    return json({ ferment: fermentJson(ferment) });
  }
  const extras = FormExtras.safeParse(body);
  const back = emptyBackPath(extras.success ? extras.data.back : undefined, id);
  const sep = back.includes('?') ? '&' : '?';
  const refuse = (code: EmptyErrorCode) => req.redirect(`${back}${sep}emptyError=${code}&ferment=${id}#empty-${id}`, 303);
  if (!parsed.success) {
    const field = parsed.error.issues[0]?.path[0];
    return refuse(EMPTY_ERROR_CODES.includes(field as EmptyErrorCode) ? (field as EmptyErrorCode) : 'invalid');
  }
  if (!extras.success || extras.data.confirm !== 'yes') return refuse('confirm');
  try {
    await emptyFerment(ctx, id, parsed.data);
  } catch (err) {
    if (err instanceof HttpError && err.status === 409) return refuse('conflict');
    if (err instanceof HttpError && err.status === 400) {
      const field = Object.keys(err.fields ?? {})[0];
      return refuse(EMPTY_ERROR_CODES.includes(field as EmptyErrorCode) ? (field as EmptyErrorCode) : 'invalid');
    }
    throw err;
  }
  return req.redirect(`${back}${sep}emptied=${id}`, 303);
});
