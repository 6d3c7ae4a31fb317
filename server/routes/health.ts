/** `GET /api/health`: the server answers, with its software version. */
import { Router } from 'express';
import type { RouteContext } from './context.js';

export function healthRoutes(context: RouteContext): Router {
  const router = Router();
  router.get('/api/health', (_request, response) => {
    response.json({ status: 'ok', software: { name: 'slopebreak', version: context.softwareVersion } });
  });
  return router;
}
