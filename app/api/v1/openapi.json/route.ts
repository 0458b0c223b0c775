import { handle } from '@/lib/http';
import { openApiDocument } from '@/lib/http/openapi';

export const dynamic = 'force-dynamic';

/** The OpenAPI 3.1 description of the v1 API; no authentication (docs/conventions.md §7). */
export const GET = handle(async () => Response.json(openApiDocument()));
