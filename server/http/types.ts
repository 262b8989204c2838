/**
 * What passport puts on `req.user`: the public user shape from the contracts.
 */
import type { User as ApiUser } from '@contracts/api';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends ApiUser {}
  }
}

export {};
