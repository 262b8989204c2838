/** Settings shared by the HTTP side of jobs and the workers. */
import { DEFAULT_QUEUE_SETTINGS, type QueueSettings } from './queue';
import { CHUNK_BYTES } from './storage';

export interface JobSettings extends QueueSettings {
  /** queued + running jobs a project may have at once; one more is refused with 409 */
  maxActivePerProject: number;
  /** compressed bytes of revision files a project may keep */
  storageQuotaBytes: number;
  /** bytes of the original file per stored piece (server/jobs/storage.ts) */
  chunkBytes: number;
  /** a job that ran at least this long e-mails its starter when it ends (server/jobs/notify.ts) */
  notifyAfterSeconds: number;
}

export const DEFAULT_JOB_SETTINGS: JobSettings = {
  ...DEFAULT_QUEUE_SETTINGS,
  // common practice: a handful per project keeps one project from filling the queue for everyone
  maxActivePerProject: 4,
  storageQuotaBytes: 2 * 1024 ** 3,
  chunkBytes: CHUNK_BYTES,
  // issue 10: "a job that ran longer than a minute"
  notifyAfterSeconds: 60,
};

export const mib = (bytes: number): string => `${(bytes / 1024 ** 2).toFixed(1)} MiB`;
