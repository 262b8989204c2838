import type { z } from 'zod';
import type { healthSchema } from '@contracts/api';
import type { RouteModule } from './context';

/** GET /api/health: 200 when the database answers, 503 when it does not. */
export const healthRoutes: RouteModule = (router, { services }) => {
  router.get('/health', async (_req, res) => {
    const up = await services.health.databaseUp();
    const body: z.infer<typeof healthSchema> = { ok: up, database: up ? 'up' : 'down' };
    res.status(up ? 200 : 503).json(body);
  });
};
