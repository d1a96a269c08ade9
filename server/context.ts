/**
 * What a request handler may need beyond the request: set once by createApp on app.locals,
 * read with `deps(req)`. Keeps middleware such as `requireSiteRole('admin')` free of wiring.
 */
import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import type { Role } from '../shared/api/auth';
import type { Config } from './config';
import type { Logger } from './logger';
import type { Notifier } from './notify';

export interface Deps {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  /** Told about opened and assigned work orders and stored findings (server/notify.ts); none: nobody is told. */
  notify?: Notifier;
}

export function deps(req: Request): Deps {
  return req.app.locals.deps as Deps;
}

export interface AuthContext {
  userId: string;
}

export interface SiteContext {
  siteId: string;
  role: Role;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by requireAuth. */
      auth?: AuthContext;
      /** Set by requireSiteRole. */
      site?: SiteContext;
    }
  }
}
