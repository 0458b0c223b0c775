import { handle } from '@/lib/api';
import { openApiDocument } from '@/lib/openapi';

export const dynamic = 'force-dynamic';

/** The OpenAPI 3.1 description of the v1 API; no authentication (CONVENTIONS §7). */
export const GET = handle(async () => Response.json(openApiDocument()));
