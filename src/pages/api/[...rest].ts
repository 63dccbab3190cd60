import type { APIRoute } from 'astro';
import { jsonError } from '../../server/http';

/** Any /api path without a route: JSON 404, never the HTML page. */
export const ALL: APIRoute = () => jsonError(404, 'not_found', 'No such API route.');
