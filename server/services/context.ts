import type { Knex } from 'knex';
import type { Logger, ResolvedConfig } from '../config';
import type { Mailer } from '../mail/mailer';

/** What every service needs; built once per app. */
export interface ServiceDeps {
  db: Knex;
  mailer: Mailer;
  config: ResolvedConfig;
  logger: Logger;
  /** the clock, injectable so expiry can be tested without waiting */
  now: () => Date;
}

/** The signed-in user as services see it. */
export interface Actor {
  id: number;
}
