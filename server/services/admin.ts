/** Site-admin views. */
import type { CapturedMail } from '@contracts/api';
import { capturedMailRepo } from '../repositories/capturedMail';
import type { ServiceDeps } from './context';

export function adminService(deps: ServiceDeps) {
  return {
    /** the newest messages caught by the development SMTP server */
    listCapturedMail(limit = 200): Promise<CapturedMail[]> {
      return capturedMailRepo(deps.db).list(limit);
    },
  };
}
